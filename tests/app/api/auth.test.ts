import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { POST as signOutPost } from '@/app/api/auth/sign-out/route';
import { POST as signUpPost } from '@/app/api/auth/sign-up/route';
import { GET as bedsGet } from '@/app/api/beds/route';
import { GET as meGet } from '@/app/api/me/route';
import { sessions, users } from '@/db/schema';
import { call, cookieFrom, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

const password = 'a long shop password';

describe('POST /api/auth/sign-up', () => {
  it('creates the user and their workshop, answers 201 and sets an httpOnly SameSite=Lax session cookie', async () => {
    const email = uniqueEmail('signup');
    const r = await call(signUpPost, { body: { email, password, name: 'Bench Hand', workshopName: 'North Bay Joinery' } });
    expect(r.status).toBe(201);
    expect(r.setCookie).toMatch(/^gp_session=Fe26\.2\*/);
    expect(r.setCookie).toMatch(/HttpOnly/);
    expect(r.setCookie).toMatch(/SameSite=Lax/);
    const body = r.json as { user: { email: string }; workshopId: string };
    expect(body.user.email).toBe(email);
    expect(JSON.stringify(body)).not.toContain(password);
    const me = await call(meGet, { cookie: cookieFrom(r.setCookie) });
    expect(me.status).toBe(200);
    expect(me.json).toMatchObject({ role: 'owner', workshopId: body.workshopId });
  });

  it('stores a bcrypt hash, never the password', async () => {
    const email = uniqueEmail('hash');
    await call(signUpPost, { body: { email, password, name: 'H', workshopName: 'W' } });
    const [row] = await t.db.select().from(users).where(eq(users.email, email));
    expect(row?.passwordHash).toMatch(/^\$2[aby]\$11\$/); // bcrypt modular crypt format, cost 11
    expect(row?.passwordHash).not.toContain(password);
  });

  it('refuses a second account for the same address (case-insensitively) with 409', async () => {
    const email = uniqueEmail('dup');
    expect((await call(signUpPost, { body: { email, password, name: 'A', workshopName: 'W' } })).status).toBe(201);
    const r = await call(signUpPost, { body: { email: email.toUpperCase(), password, name: 'B', workshopName: 'W' } });
    expect(r.status).toBe(409);
    expect(r.json).toMatchObject({ error: { code: 'conflict', fields: { email: expect.any(String) } } });
  });

  it('answers 422 with per-field messages for a short password and a bad address, without echoing the password', async () => {
    const r = await call(signUpPost, { body: { email: 'not-an-address', password: 'short', name: '', workshopName: 'W' } });
    expect(r.status).toBe(422);
    const err = (r.json as { error: { code: string; fields: Record<string, string> } }).error;
    expect(err.code).toBe('invalid_input');
    expect(Object.keys(err.fields).sort()).toEqual(['email', 'name', 'password']);
    expect(JSON.stringify(r.json)).not.toContain('short');
  });

  it('answers 400 invalid_json for a body that is not JSON', async () => {
    const r = await call(signUpPost, { body: '{nope' });
    expect(r.status).toBe(400);
    expect(r.json).toMatchObject({ error: { code: 'invalid_json' } });
  });

  it('refuses a cross-site browser POST with 403 and creates nothing', async () => {
    const email = uniqueEmail('xsite');
    const r = await call(signUpPost, { body: { email, password, name: 'X', workshopName: 'W' }, headers: { origin: 'https://elsewhere.example', 'sec-fetch-site': 'cross-site' } });
    expect(r.status).toBe(403);
    expect(r.json).toMatchObject({ error: { code: 'cross_site' } });
    expect(await t.db.select().from(users).where(eq(users.email, email))).toHaveLength(0);
  });
});

describe('sign-in and sign-out', () => {
  it('signs in with the right password (200 + cookie) and refuses a wrong one with 401', async () => {
    const email = uniqueEmail('signin');
    await call(signUpPost, { body: { email, password, name: 'S', workshopName: 'W' } });
    const ok = await call(signInPost, { body: { email: `  ${email.toUpperCase()} `, password } });
    expect(ok.status).toBe(200);
    expect(ok.setCookie).toMatch(/^gp_session=/);
    const bad = await call(signInPost, { body: { email, password: 'wrong password here' } });
    expect(bad.status).toBe(401);
    expect(bad.json).toMatchObject({ error: { code: 'bad_credentials' } });
    expect(bad.setCookie).toBeNull();
  });

  it('answers 401 for an unknown address with the same message as for a wrong password', async () => {
    const email = uniqueEmail('known');
    await call(signUpPost, { body: { email, password, name: 'S', workshopName: 'W' } });
    const unknown = await call(signInPost, { body: { email: uniqueEmail('nobody'), password } });
    const wrong = await call(signInPost, { body: { email, password: 'not the password' } });
    expect(unknown.status).toBe(401);
    expect(unknown.json).toEqual(wrong.json);
  });

  it('revokes the server-side session on sign-out, so the old cookie no longer works', async () => {
    const email = uniqueEmail('out');
    const up = await call(signUpPost, { body: { email, password, name: 'O', workshopName: 'W' } });
    const cookie = cookieFrom(up.setCookie);
    expect((await call(bedsGet, { cookie })).status).toBe(200);
    const out = await call(signOutPost, { method: 'POST', cookie });
    expect(out.status).toBe(200);
    expect(out.setCookie).toMatch(/Max-Age=0/);
    expect((await call(bedsGet, { cookie })).status).toBe(401);
    const revoked = await t.db.select().from(sessions);
    expect(revoked.some((s) => s.revokedAt !== null)).toBe(true);
  });

  it('answers 401 to an anonymous call and to a forged cookie', async () => {
    expect((await call(bedsGet)).status).toBe(401);
    const forged = await call(bedsGet, { cookie: 'gp_session=Fe26.2**forged*value' });
    expect(forged.status).toBe(401);
    expect(forged.json).toMatchObject({ error: { code: 'unauthenticated' } });
  });

  it('rate-limits sign-in attempts per address with 429', async () => {
    const email = uniqueEmail('limit');
    let last = 0;
    for (let i = 0; i < 21; i++) last = (await call(signInPost, { body: { email, password: 'whatever it is' } })).status;
    expect(last).toBe(429);
  });
});
