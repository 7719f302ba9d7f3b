/**
 * The header values themselves (the built app's answers are checked in tests/e2e/security-headers.test.ts).
 * Directive grammar from CSP Level 3 (W3C); header names from the OWASP HTTP headers cheat sheet.
 */
import { describe, expect, it } from 'vitest';
import { contentSecurityPolicy, httpsOnlyHeaders, securityHeaders } from '@/lib/security/headers.mjs';

const directive = (csp: string, name: string) => csp.split(';').map((d) => d.trim()).find((d) => d.startsWith(`${name} `));

describe('security headers', () => {
  it("forbids eval and framing in production and keeps eval for development's tools only", () => {
    const prod = contentSecurityPolicy({ production: true });
    expect(prod).not.toContain('unsafe-eval');
    expect(directive(prod, 'frame-ancestors')).toBe("frame-ancestors 'none'");
    expect(directive(prod, 'object-src')).toBe("object-src 'none'");
    expect(directive(prod, 'default-src')).toBe("default-src 'self'");
    expect(contentSecurityPolicy({ production: false })).toContain("'unsafe-eval'");
  });

  it('sends nosniff, DENY framing and a same-origin referrer policy', () => {
    const h = Object.fromEntries(securityHeaders({ production: true }).map((x) => [x.key.toLowerCase(), x.value]));
    expect(h['x-content-type-options']).toBe('nosniff');
    expect(h['x-frame-options']).toBe('DENY');
    expect(h['referrer-policy']).toBe('same-origin');
  });

  it('is wired into next.config.mjs for every path', async () => {
    const configUrl = new URL('../../next.config.mjs', import.meta.url).href;
    const config = ((await import(/* @vite-ignore */ configUrl)) as { default: { headers?: () => Promise<{ source: string; headers: { key: string }[] }[]> } }).default;
    const rules = await config.headers!();
    const all = rules.find((r) => r.source === '/:path*');
    expect(all?.headers.map((x) => x.key)).toContain('Content-Security-Policy');
  });

  it('sends HSTS only on answers that came over HTTPS (RFC 6797 §7.2: never over plain HTTP)', async () => {
    expect(securityHeaders({ production: true }).map((x) => x.key)).not.toContain('Strict-Transport-Security');
    expect(httpsOnlyHeaders({ production: true }).map((x) => x.key)).toEqual(['Strict-Transport-Security']);
    const configUrl = new URL('../../next.config.mjs', import.meta.url).href;
    const prev = process.env.NODE_ENV;
    (process.env as Record<string, string>).NODE_ENV = 'production';
    try {
      const config = ((await import(/* @vite-ignore */ `${configUrl}?production`)) as { default: { headers: () => Promise<{ source: string; has?: { type: string; key: string; value?: string }[]; headers: { key: string }[] }[]> } }).default;
      const hsts = (await config.headers()).filter((r) => r.headers.some((x) => x.key === 'Strict-Transport-Security'));
      expect(hsts).toHaveLength(1);
      expect(hsts[0]!.has).toEqual([{ type: 'header', key: 'x-forwarded-proto', value: 'https' }]);
    } finally {
      (process.env as Record<string, string | undefined>).NODE_ENV = prev;
    }
  });
});
