/**
 * Rate limits shared by every web instance: fixed-window counters in the `rate_limits` table (one atomic
 * upsert per hit, db/queries/rate-limits.ts), so two web processes on one database count together.
 *
 * Sign-in is limited twice: per account (the e-mail address tried, whoever tries it) and per client address
 * (whichever accounts it tries). The address is what the proxy or Next reports in X-Forwarded-For; with no
 * address known only the per-account limit applies. Counting happens before the password is checked, so a
 * flood costs the attacker a refusal, not us a bcrypt hash.
 */
import type { Db } from '@/db/client';
import { hitRateLimit } from '@/db/queries/rate-limits';
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

/** Sign-in attempts per e-mail address: 20 per 15 min (OWASP's authentication cheat sheet asks for a limit, not a number). */
export const SIGN_IN_PER_ACCOUNT: RateRule = { name: 'sign-in', limit: 20, windowMs: 15 * 60_000 };
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

/** Throws AppError 429 `rate_limited` (with `message`, and the wait in minutes) when over the limit. */
export async function enforce(db: Db, rule: RateRule, subject: string, message: string, now = Date.now()): Promise<RateDecision> {
  const d = await consume(db, rule, subject, now);
  if (!d.allowed) {
    const minutes = Math.max(1, Math.ceil(d.retryAfterS / 60));
    throw new AppError('rate_limited', 429, `${message} Try again in ${minutes} min.`);
  }
  return d;
}

/** Counts a sign-in attempt for the account and the address; throws 429 when either is over its limit. */
export async function assertSignInAllowed(db: Db, attempt: { email: string; ip?: string | null }, now = Date.now()): Promise<void> {
  await enforce(db, SIGN_IN_PER_ACCOUNT, normaliseEmail(attempt.email), 'Too many sign-in attempts for this address.', now);
  if (attempt.ip) await enforce(db, SIGN_IN_PER_ADDRESS, attempt.ip, 'Too many sign-in attempts from your network.', now);
}

/** Counts an account creation from the address; throws 429 when over the limit. */
export async function assertSignUpAllowed(db: Db, ip: string | null | undefined, now = Date.now()): Promise<void> {
  if (ip) await enforce(db, SIGN_UP_PER_ADDRESS, ip, 'Too many new accounts from your network.', now);
}
