/**
 * Rate limits on a real migrated SQLite file: two separate database connections stand in for two web
 * instances and must count together. Fixed-window counting as in the OWASP authentication cheat sheet's
 * advice to throttle per account and per source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDb, type Db } from '@/db/client';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { consume, SIGN_IN_PER_ACCOUNT, SIGN_IN_PER_ADDRESS, type RateRule } from '@/lib/security/rate-limit';
import { call, newOwner, TEST_PASSWORD, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
let second: Db;

beforeAll(async () => {
  t = await useFreshDatabase();
  second = await openDb(process.env.DATABASE_URL);
});
afterAll(async () => { second.$client.close(); await t.close(); });

describe('rate limits', () => {
  it('counts hits from two instances on one database together and resets after the window', async () => {
    const rule: RateRule = { name: 'test', limit: 3, windowMs: 1000 };
    const now = 1_000_000;
    const seen = [];
    for (let i = 0; i < 4; i++) seen.push((await consume(i % 2 ? second : t.db, rule, 'k', now + i)).allowed);
    expect(seen).toEqual([true, true, true, false]);
    expect((await consume(second, rule, 'k', now + 1000)).count).toBe(1);
  });

  // Each refused password costs a bcrypt hash (~0.2 s), so the counters are brought near their limits with
  // consume() on the same keys the route uses, after a few real attempts have shown that the route counts.
  it('limits sign-in per account even when every attempt comes from a new address', async () => {
    const email = uniqueEmail('target');
    for (let i = 0; i < 3; i++) {
      const r = await call(signInPost, { body: { email, password: 'wrong guess number ' + i }, headers: { 'x-forwarded-for': `198.51.100.${i + 1}` } });
      expect(r.status).toBe(401);
    }
    const counted = await consume(t.db, SIGN_IN_PER_ACCOUNT, email);
    expect(counted.count).toBe(4); // three attempts through the route, one here
    for (let i = counted.count; i < SIGN_IN_PER_ACCOUNT.limit; i++) await consume(second, SIGN_IN_PER_ACCOUNT, email);
    const over = await call(signInPost, { body: { email: email.toUpperCase(), password: 'yet another guess' }, headers: { 'x-forwarded-for': '198.51.100.200' } });
    expect(over.status).toBe(429);
    expect(over.json).toMatchObject({ error: { code: 'rate_limited' } });
  });

  it('limits sign-in per address across many accounts, and leaves other addresses alone', async () => {
    const owner = await newOwner(t.db);
    const ip = '203.0.113.77';
    for (let i = 0; i < 3; i++) {
      expect((await call(signInPost, { body: { email: uniqueEmail('spray'), password: 'some guess here' }, headers: { 'x-forwarded-for': ip } })).status).toBe(401);
    }
    const counted = await consume(t.db, SIGN_IN_PER_ADDRESS, ip);
    expect(counted.count).toBe(4);
    for (let i = counted.count; i < SIGN_IN_PER_ADDRESS.limit; i++) await consume(second, SIGN_IN_PER_ADDRESS, ip);
    const blocked = await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: { 'x-forwarded-for': ip } });
    expect(blocked.status).toBe(429);
    expect(blocked.json).toMatchObject({ error: { code: 'rate_limited' } });
    expect(JSON.stringify(blocked.json)).not.toContain(TEST_PASSWORD);
    const elsewhere = await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: { 'x-forwarded-for': '192.0.2.1' } });
    expect(elsewhere.status).toBe(200);
  });
});
