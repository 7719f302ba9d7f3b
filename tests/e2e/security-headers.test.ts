/**
 * Security headers on the built app (next start, production): every answer — a page, an API answer, a static
 * asset, a 404 — carries the CSP without 'unsafe-eval' and with frame-ancestors 'none', nosniff, DENY framing
 * and the referrer policy. Header meanings: CSP Level 3 (W3C) and the OWASP HTTP headers cheat sheet.
 * Also the sign-in limits over real HTTP: the address comes from X-Forwarded-For as the proxy sets it.
 */
import { describe, expect, it } from 'vitest';
import { Client, e2eEmail } from './client';

function assertHeaders(h: Headers, where: string) {
  const csp = h.get('content-security-policy') ?? '';
  expect(csp, where).toContain("default-src 'self'");
  expect(csp, where).toContain("frame-ancestors 'none'");
  expect(csp, where).not.toContain('unsafe-eval');
  expect(h.get('x-content-type-options'), where).toBe('nosniff');
  expect(h.get('x-frame-options'), where).toBe('DENY');
  expect(h.get('referrer-policy'), where).toMatch(/^(same-origin|no-referrer)$/);
  expect(h.get('x-powered-by'), where).toBeNull();
}

describe('security headers of the built app', () => {
  it('are on pages, API answers, static assets and not-found answers', async () => {
    const c = new Client();
    const page = await c.req('GET', '/sign-in');
    expect(page.status).toBe(200);
    assertHeaders(page.headers, '/sign-in');
    const api = await c.req('GET', '/api/me');
    expect(api.status).toBe(401);
    assertHeaders(api.headers, '/api/me');
    const missing = await c.req('GET', '/no-such-page-here');
    expect(missing.status).toBe(404);
    assertHeaders(missing.headers, '404');
    const asset = page.text.match(/\/_next\/static\/[^"']+\.js/)?.[0];
    expect(asset).toBeDefined();
    const js = await c.req('GET', asset!);
    expect(js.status).toBe(200);
    assertHeaders(js.headers, asset!);
  });

  it('refuses a cross-site sign-in post over HTTP', async () => {
    const c = new Client();
    const r = await c.req('POST', '/api/auth/sign-in', { email: e2eEmail('x'), password: 'whatever it is' }, { origin: 'https://evil.example' });
    expect(r.status).toBe(403);
    expect(r.json).toMatchObject({ error: { code: 'cross_site' } });
  });
});
