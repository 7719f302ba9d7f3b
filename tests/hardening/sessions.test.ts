/**
 * Sessions and passwords against the usual attacks (OWASP session management and authentication cheat
 * sheets): a new session at sign-in (no fixation), sign-out, password change and password reset end the
 * server-side session so a copied cookie stops working, weak passwords are refused at sign-up, change and
 * reset, and every changing handler refuses a request from another site (Origin / Sec-Fetch-Site, the
 * Fetch Metadata spec, W3C).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as resetRequestPost } from '@/app/api/auth/password-reset/route';
import { POST as resetConfirmPost } from '@/app/api/auth/password-reset/confirm/route';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { POST as signOutPost } from '@/app/api/auth/sign-out/route';
import { POST as signUpPost } from '@/app/api/auth/sign-up/route';
import { GET as meGet } from '@/app/api/me/route';
import { POST as passwordPost } from '@/app/api/me/password/route';
import { outgoingMail, sessions } from '@/db/schema';
import { unsealSession } from '@/lib/auth/session';
import { call, cookieFrom, TEST_PASSWORD, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => { t = await useFreshDatabase(); });
afterAll(async () => { await t.close(); });

async function signUp(password = TEST_PASSWORD) {
  const email = uniqueEmail('sess');
  const r = await call(signUpPost, { body: { email, password, name: 'Sam Planer', workshopName: 'Session shop' } });
  expect(r.status).toBe(201);
  return { email, cookie: cookieFrom(r.setCookie) };
}
const signIn = async (email: string, password: string, cookie?: string) => call(signInPost, { body: { email, password }, cookie });
const me = async (cookie: string) => (await call(meGet, { cookie })).status;
const sid = async (cookie: string) => (await unsealSession(decodeURIComponent(cookie.split('=').slice(1).join('='))))?.sid;

describe('sessions', () => {
  it('starts a new server-side session at sign-in and ends the one the browser held before', async () => {
    const { email, cookie: before } = await signUp();
    const r = await signIn(email, TEST_PASSWORD, before);
    expect(r.status).toBe(200);
    const after = cookieFrom(r.setCookie);
    expect(await sid(after)).not.toBe(await sid(before));
    expect(await me(after)).toBe(200);
    expect(await me(before)).toBe(401); // a cookie planted or copied before sign-in is worth nothing after it
  });

  it('ends the session for good at sign-out: a copied cookie stops working too', async () => {
    const { email } = await signUp();
    const cookie = cookieFrom((await signIn(email, TEST_PASSWORD)).setCookie);
    const copy = `${cookie}`;
    expect(await me(copy)).toBe(200);
    const out = await call(signOutPost, { method: 'POST', cookie });
    expect(out.status).toBe(200);
    expect(out.setCookie).toMatch(/Max-Age=0/);
    expect(await me(copy)).toBe(401);
    const id = await sid(cookie);
    const row = (await t.db.select().from(sessions)).find((s) => s.id === id);
    expect(row?.revokedAt).toBeGreaterThan(0); // revoked on the server, not only cleared in the browser
  });

  it('ends every session of the user at a password change, and keeps the changer signed in with a new one', async () => {
    const { email, cookie: laptop } = await signUp();
    const phone = cookieFrom((await signIn(email, TEST_PASSWORD)).setCookie);
    const stolen = `${phone}`;
    const wrong = await call(passwordPost, { cookie: laptop, body: { currentPassword: 'not my password at all', newPassword: 'violet kettle under the lathe' } });
    expect(wrong.status).toBe(422);
    expect(await me(stolen)).toBe(200); // a refused change ends nothing
    const ok = await call(passwordPost, { cookie: laptop, body: { currentPassword: TEST_PASSWORD, newPassword: 'violet kettle under the lathe' } });
    expect(ok.status).toBe(200);
    const fresh = cookieFrom(ok.setCookie);
    expect(await me(fresh)).toBe(200);
    expect(await me(laptop)).toBe(401);
    expect(await me(stolen)).toBe(401);
    expect((await signIn(email, TEST_PASSWORD)).status).toBe(401);
    expect((await signIn(email, 'violet kettle under the lathe')).status).toBe(200);
    expect(JSON.stringify(ok.json) + JSON.stringify(wrong.json)).not.toContain('violet kettle');
  });

  it('ends every session of the user at a password reset', async () => {
    const { email, cookie } = await signUp();
    expect((await call(resetRequestPost, { body: { email } })).status).toBe(202);
    const mail = (await t.db.select().from(outgoingMail)).find((m) => m.toAddress === email && m.kind === 'password-reset');
    const token = mail?.text.match(/reset-password\/([A-Za-z0-9_-]{43})/)?.[1];
    expect(token).toBeDefined();
    const weak = await call(resetConfirmPost, { body: { token, password: 'Password123!' } });
    expect(weak.status).toBe(422);
    expect(await me(cookie)).toBe(200);
    const r = await call(resetConfirmPost, { body: { token, password: 'copper fence over nine' } });
    expect(r.status).toBe(200);
    expect(await me(cookie)).toBe(401);
  });
});

describe('passwords', () => {
  it('refuses short, common and own-name passwords at sign-up and change, naming the field and never echoing it', async () => {
    for (const password of ['short pw', 'qwertyuiop123', 'P4ssw0rd2024']) {
      const r = await call(signUpPost, { body: { email: uniqueEmail('weak'), password, name: 'Sam', workshopName: 'W' } });
      expect(r.status, password).toBe(422);
      const e = (r.json as { error: { fields?: Record<string, string> } }).error;
      expect(e.fields?.password, password).toBeDefined();
      expect(JSON.stringify(r.json)).not.toContain(password);
    }
    const { cookie } = await signUp();
    const own = await call(passwordPost, { cookie, body: { currentPassword: TEST_PASSWORD, newPassword: 'Sam Planer 2024' } });
    expect(own.status).toBe(422);
    expect((own.json as { error: { fields?: Record<string, string> } }).error.fields?.newPassword).toBeDefined();
  });
});

describe('cross-site requests', () => {
  type Handler = (req: Request, c?: { params: Promise<Record<string, string>> }) => Promise<Response>;
  function handlers(dir: string): { file: string; method: string }[] {
    const out: { file: string; method: string }[] = [];
    for (const name of readdirSync(dir)) {
      const p = join(dir, name);
      if (statSync(p).isDirectory()) out.push(...handlers(p));
      else if (name === 'route.ts') {
        const src = readFileSync(p, 'utf8');
        for (const m of ['POST', 'PUT', 'PATCH', 'DELETE']) if (new RegExp(`export\\s+(const|async\\s+function|function)\\s+${m}\\b`).test(src)) out.push({ file: p, method: m });
      }
    }
    return out;
  }

  it('refuses every changing handler called from another site, before it reads the session or the body', async () => {
    const { cookie } = await signUp();
    const found = handlers(join(process.cwd(), 'app', 'api'));
    expect(found.length).toBeGreaterThan(10);
    const before = (await t.db.select().from(sessions)).length;
    const seen: string[] = [];
    for (const { file, method } of found) {
      const handler = ((await import(/* @vite-ignore */ pathToFileURL(file).href)) as Record<string, Handler>)[method]!;
      const where = `${method} ${relative(process.cwd(), file)}`;
      const attempts: Record<string, string>[] = [{ origin: 'https://evil.example' }, { 'sec-fetch-site': 'cross-site' }, { origin: 'null' }];
      for (const headers of attempts) {
        const res = await handler(new Request('http://gridproof.test/api/x', { method, headers: { host: 'gridproof.test', cookie, 'content-type': 'application/json', ...headers }, body: '{}' }),
          { params: Promise.resolve({ id: 'x', token: 'x', userId: 'x', other: 'x', commentId: 'x' }) });
        const body = (await res.json()) as { error?: { code: string } };
        expect([res.status, body.error?.code], `${where} ${JSON.stringify(headers)}`).toEqual([403, 'cross_site']);
      }
      seen.push(where);
    }
    // a same-site request with the right Origin gets past the check (sign-out, say: it answers 200)
    const same = await call(signOutPost, { method: 'POST', cookie, headers: { origin: 'http://gridproof.test', 'sec-fetch-site': 'same-origin' } });
    expect(same.status).toBe(200);
    expect((await t.db.select().from(sessions)).length).toBe(before);
    expect(seen.length).toBe(found.length);
  });
});
