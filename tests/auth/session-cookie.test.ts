/**
 * The session cookie's Secure flag follows the request's real scheme (RFC 6265bis §5.6: a user agent ignores
 * a Secure cookie set over an insecure channel, except on localhost in Chromium and Firefox): over plain HTTP
 * on a shop LAN it is sent without Secure so the browser keeps it; over HTTPS (the socket's TLS, or a trusted
 * proxy's X-Forwarded-Proto as the web server writes it) it carries Secure. COOKIE_SECURE=1|0 forces it.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { readCookie } from '@/lib/auth/session';
import { call, newOwner, TEST_PASSWORD, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
let email: string;
beforeAll(async () => { t = await useFreshDatabase(); email = (await newOwner(t.db)).user.email; });
afterAll(async () => { await t.close(); });
afterEach(() => { delete process.env.COOKIE_SECURE; });

const signIn = async (headers: Record<string, string>) => {
  const r = await call(signInPost, { body: { email, password: TEST_PASSWORD }, headers });
  expect(r.status).toBe(200);
  return (r.res.headers.get('set-cookie') ?? '').split(';').map((s) => s.trim());
};

describe('the session cookie', () => {
  it('has no Secure over plain HTTP and Secure over HTTPS', async () => {
    expect(await signIn({ 'x-forwarded-proto': 'http' })).not.toContain('Secure');
    expect(await signIn({})).not.toContain('Secure'); // http://gridproof.test, no header
    const https = await signIn({ 'x-forwarded-proto': 'https' });
    expect(https).toContain('Secure');
    expect(https).toContain('HttpOnly');
  });

  it('follows COOKIE_SECURE when it is set', async () => {
    process.env.COOKIE_SECURE = '1';
    expect(await signIn({ 'x-forwarded-proto': 'http' })).toContain('Secure');
    process.env.COOKIE_SECURE = '0';
    expect(await signIn({ 'x-forwarded-proto': 'https' })).not.toContain('Secure');
  });

  it('reads a malformed percent escape as the bytes sent, never throwing', () => {
    expect(readCookie('gp_session=%E0%A4%A', 'gp_session')).toBe('%E0%A4%A');
    expect(readCookie('a=1; gp_session=%41%42', 'gp_session')).toBe('AB');
  });
});
