/**
 * Security headers on the built app (the production web server): every answer — a page, an API answer, a static
 * asset, a 404 — carries the CSP without 'unsafe-eval' and with frame-ancestors 'none', nosniff, DENY framing
 * and the referrer policy. Header meanings: CSP Level 3 (W3C) and the OWASP HTTP headers cheat sheet.
 * Also the client address over real HTTP: the web server (lib/cli/web-server.mjs, TRUST_PROXY_HOPS unset here,
 * so no proxy is trusted) counts a sign-in against the socket's address whatever X-Forwarded-For says.
 */
import { join } from 'node:path';
import { inArray } from 'drizzle-orm';
import { describe, expect, inject, it } from 'vitest';
import { openDb } from '@/db/client';
import { rateLimits } from '@/db/schema';
import { Client, e2eEmail } from './client';

const dataDir = inject('dataDir');

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

  it('counts a sign-in against the socket address, not an X-Forwarded-For the client wrote itself', async () => {
    const db = await openDb(`file:${join(dataDir, 'e2e.db')}`);
    try {
      const keys = ['sign-in-ip:127.0.0.1', 'sign-in-ip:::1', 'sign-in-ip:198.51.100.23', 'sign-in-ip:198.51.100.24'];
      const counts = async () => Object.fromEntries((await db.select().from(rateLimits).where(inArray(rateLimits.key, keys))).map((r) => [r.key, r.count]));
      const before = await counts();
      const c = new Client();
      for (const spoof of ['198.51.100.23', '198.51.100.24, 198.51.100.23']) {
        const r = await c.req('POST', '/api/auth/sign-in', { email: e2eEmail('spoof'), password: 'not the password' }, { 'x-forwarded-for': spoof, 'x-real-ip': spoof });
        expect(r.status).toBe(401);
      }
      const after = await counts();
      expect(after['sign-in-ip:198.51.100.23']).toBeUndefined();
      expect(after['sign-in-ip:198.51.100.24']).toBeUndefined();
      const local = (k: string) => (after[k] ?? 0) - (before[k] ?? 0);
      expect(local('sign-in-ip:127.0.0.1') + local('sign-in-ip:::1')).toBe(2);
    } finally {
      db.$client.close();
    }
  });
});
