/**
 * Rate limits on a real migrated SQLite file: two separate database connections stand in for two web
 * instances and must count together. The OWASP authentication cheat sheet's advice: throttle per source and
 * account, and do not let an attacker lock an account by failing on purpose.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDb, type Db } from '@/db/client';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { admitWithDelay } from '@/db/queries/rate-limits';
import { consume, SIGN_IN_ACCOUNT_SLOWDOWN, SIGN_IN_PAIR, SIGN_IN_PER_ADDRESS, type RateRule } from '@/lib/security/rate-limit';
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

  it('gives each (address, account) pair a few attempts, then a delay that doubles each time', async () => {
    const rule = { free: 2, baseDelayMs: 1000, maxDelayMs: 5000, forgetMs: 60_000 };
    // a client that retries the moment it is told to, alternating between two instances
    let now = 5_000_000;
    const admittedAt: number[] = [];
    for (let i = 0; admittedAt.length < 8; i++) {
      const d = await admitWithDelay(i % 2 ? second : t.db, 'pair:test', rule, now);
      if (d.admitted) { admittedAt.push(now); continue; }
      expect((await admitWithDelay(t.db, 'pair:test', rule, d.retryAt - 1)).admitted).toBe(false);
      now = d.retryAt;
    }
    // two at once, then waits of 1 s, 2 s, 4 s and the 5 s cap: the doubling the rule states
    expect(admittedAt.slice(1).map((at, i) => at - admittedAt[i]!)).toEqual([0, 1000, 2000, 4000, 5000, 5000, 5000]);
    expect((await admitWithDelay(t.db, 'pair:test', rule, now + 60_000)).admitted).toBe(true); // forgotten after a quiet hour
  });

  it('lets no parallel flood through the gap: one pair admits exactly its free attempts', async () => {
    const rule = { free: 3, baseDelayMs: 60_000, maxDelayMs: 60_000, forgetMs: 600_000 };
    const now = 9_000_000;
    const all = await Promise.all(Array.from({ length: 24 }, (_, i) => admitWithDelay(i % 2 ? second : t.db, 'pair:flood', rule, now)));
    expect(all.filter((d) => d.admitted)).toHaveLength(rule.free);
  });

  // The case that locked owners out: 20 wrong passwords for one e-mail. Each refused password costs a bcrypt
  // hash (~0.2 s), so the account's counter is brought past its limit with consume() on the route's key.
  it('never locks the owner out: after 20 wrong passwords from one address the right one from another signs in', async () => {
    const owner = await newOwner(t.db);
    const attacker = { 'x-forwarded-for': '198.51.100.66' };
    const answers: number[] = [];
    for (let i = 0; i < SIGN_IN_PAIR.free + 1; i++) {
      answers.push((await call(signInPost, { body: { email: owner.user.email, password: `wrong guess ${i}` }, headers: attacker })).status);
    }
    // the free attempts are answered; the next comes inside the delay the last of them started
    expect(answers).toEqual([...Array(SIGN_IN_PAIR.free).fill(401), 429]);
    const refused = await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: attacker });
    expect(refused.status).toBe(429);
    expect(refused.json).toMatchObject({ error: { code: 'rate_limited' } });
    expect(Number(refused.res.headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
    expect(JSON.stringify(refused.json)).not.toContain(TEST_PASSWORD);
    for (let i = 0; i < 20; i++) await consume(second, { name: SIGN_IN_ACCOUNT_SLOWDOWN.name, limit: SIGN_IN_ACCOUNT_SLOWDOWN.limit, windowMs: SIGN_IN_ACCOUNT_SLOWDOWN.windowMs }, owner.user.email);
    // the owner at another address, and over the loopback of another host (127.0.0.2)
    for (const ip of ['192.0.2.1', '127.0.0.2']) {
      const mine = await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: { 'x-forwarded-for': ip } });
      expect(mine.status).toBe(200);
    }
  });

  it('a success clears its pair, so the owner is not delayed by their own earlier typos', async () => {
    const owner = await newOwner(t.db);
    const here = { 'x-forwarded-for': '203.0.113.9' };
    for (let i = 0; i < SIGN_IN_PAIR.free - 1; i++) expect((await call(signInPost, { body: { email: owner.user.email, password: `typo ${i}` }, headers: here })).status).toBe(401);
    expect((await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: here })).status).toBe(200);
    for (let i = 0; i < SIGN_IN_PAIR.free - 1; i++) expect((await call(signInPost, { body: { email: owner.user.email, password: `typo again ${i}` }, headers: here })).status).toBe(401);
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
    expect(Number(blocked.res.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(JSON.stringify(blocked.json)).not.toContain(TEST_PASSWORD);
    const elsewhere = await call(signInPost, { body: { email: owner.user.email, password: TEST_PASSWORD }, headers: { 'x-forwarded-for': '192.0.2.1' } });
    expect(elsewhere.status).toBe(200);
  });
});
