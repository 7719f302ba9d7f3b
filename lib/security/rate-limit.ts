/**
 * Rate limits shared by every web instance: fixed-window counters in the `rate_limits` table (one atomic
 * upsert per hit, db/queries/rate-limits.ts), so two web processes on one database count together.
 *
 * Sign-in is limited so that no one can lock an owner out (OWASP authentication cheat sheet: throttle per
 * source and account, and beware of lockouts an attacker can trigger):
 * - per (client address, account) pair: `SIGN_IN_PAIR.free` attempts, then a growing delay (1 s, 2 s, 4 s, …
 *   up to 15 min) answered with 429 and Retry-After; a successful sign-in clears the pair;
 * - per client address over all accounts: a fixed window (a spray over many accounts), 429 with Retry-After;
 * - per account over all addresses: never a refusal, only a slower answer (`SIGN_IN_ACCOUNT_SLOWDOWN`), so the
 *   owner's right password from another address always signs in.
 * The address is the one the web server derived from the socket (lib/http/forwarded.mjs, TRUST_PROXY_HOPS);
 * with no address known, the pair is keyed by the account alone. Counting happens before the password is
 * checked, so a flood costs the attacker a refusal, not us a bcrypt hash.
 */
import { setTimeout } from 'node:timers/promises';
import type { Db } from '@/db/client';
import { admitWithDelay, clearRateLimit, hitRateLimit, type DelayRule } from '@/db/queries/rate-limits';
import { normaliseEmail } from '@/db/queries/users';
import { AppError } from '@/lib/http/errors';

export interface RateRule {
  /** Key prefix in rate_limits. */
  name: string;
  /** Hits allowed per window. */
  limit: number;
  /** Window length, ms. */
  windowMs: number;
}

/**
 * Sign-in attempts per (address, account) pair: 5 at once, then waits doubling from 1 s to at most 15 min,
 * forgotten after an hour without an attempt (OWASP asks for a throttle, not these numbers: our choice).
 */
export const SIGN_IN_PAIR: DelayRule & { name: string } = { name: 'sign-in-pair', free: 5, baseDelayMs: 1_000, maxDelayMs: 15 * 60_000, forgetMs: 60 * 60_000 };
/**
 * Sign-in attempts per account from any address: past `limit` in the window, each answer is held back
 * `stepMs` more per attempt, up to `maxMs`, and still answered (a slowdown, never a lockout).
 */
export const SIGN_IN_ACCOUNT_SLOWDOWN = { name: 'sign-in', limit: 20, windowMs: 15 * 60_000, stepMs: 100, maxMs: 2_000 } as const;
/** Sign-in attempts per client address, over all accounts: 100 per 15 min (a workshop behind one NAT shares it). */
export const SIGN_IN_PER_ADDRESS: RateRule = { name: 'sign-in-ip', limit: 100, windowMs: 15 * 60_000 };
/** Accounts made per client address: 10 per hour. */
export const SIGN_UP_PER_ADDRESS: RateRule = { name: 'sign-up-ip', limit: 10, windowMs: 60 * 60_000 };

export interface RateDecision {
  allowed: boolean;
  count: number;
  resetAt: number;
  /** Whole seconds until the window resets (for a Retry-After header). */
  retryAfterS: number;
}

/** Counts one hit of `subject` under `rule` and says whether it is within the limit. */
export async function consume(db: Db, rule: RateRule, subject: string, now = Date.now()): Promise<RateDecision> {
  const { count, resetAt } = await hitRateLimit(db, `${rule.name}:${subject}`, rule.windowMs, now);
  return { allowed: count <= rule.limit, count, resetAt, retryAfterS: Math.max(1, Math.ceil((resetAt - now) / 1000)) };
}

/** "8 s", "3 min": a wait for a person. */
function waitWords(seconds: number): string {
  return seconds < 90 ? `${seconds} s` : `${Math.ceil(seconds / 60)} min`;
}

/** AppError 429 `rate_limited` with a Retry-After header (RFC 9110 §10.2.3: whole seconds). */
export function rateLimited(message: string, retryAfterS: number): AppError {
  const s = Math.max(1, Math.ceil(retryAfterS));
  return new AppError('rate_limited', 429, `${message} Try again in ${waitWords(s)}.`, undefined, { 'retry-after': String(s) });
}

/** Throws a 429 `rate_limited` (with `message`, the wait and Retry-After) when over the limit. */
export async function enforce(db: Db, rule: RateRule, subject: string, message: string, now = Date.now()): Promise<RateDecision> {
  const d = await consume(db, rule, subject, now);
  if (!d.allowed) throw rateLimited(message, d.retryAfterS);
  return d;
}

const pairKey = (attempt: { email: string; ip?: string | null }) => `${SIGN_IN_PAIR.name}:${attempt.ip ?? '-'}|${normaliseEmail(attempt.email)}`;

/**
 * Counts a sign-in attempt and admits it or throws 429: the (address, account) pair's delay and the address's
 * window refuse; the account's count only slows the answer (returned as `slowMs`, waited here).
 */
export async function assertSignInAllowed(db: Db, attempt: { email: string; ip?: string | null }, now = Date.now()): Promise<{ slowMs: number }> {
  const pair = await admitWithDelay(db, pairKey(attempt), SIGN_IN_PAIR, now);
  if (!pair.admitted) throw rateLimited('Too many wrong passwords for this account from your address.', (pair.retryAt - now) / 1000);
  if (attempt.ip) await enforce(db, SIGN_IN_PER_ADDRESS, attempt.ip, 'Too many sign-in attempts from your network.', now);
  const rule = SIGN_IN_ACCOUNT_SLOWDOWN;
  const account = await consume(db, { name: rule.name, limit: rule.limit, windowMs: rule.windowMs }, normaliseEmail(attempt.email), now);
  const slowMs = account.allowed ? 0 : Math.min(rule.maxMs, (account.count - rule.limit) * rule.stepMs);
  if (slowMs > 0) await setTimeout(slowMs);
  return { slowMs };
}

/** A successful sign-in forgets its (address, account) pair's count. */
export async function signInSucceeded(db: Db, attempt: { email: string; ip?: string | null }): Promise<void> {
  await clearRateLimit(db, pairKey(attempt));
}

/** Counts an account creation from the address; throws 429 when over the limit. */
export async function assertSignUpAllowed(db: Db, ip: string | null | undefined, now = Date.now()): Promise<void> {
  if (ip) await enforce(db, SIGN_UP_PER_ADDRESS, ip, 'Too many new accounts from your network.', now);
}
