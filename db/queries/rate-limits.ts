/** Fixed-window counters shared by every web process (rate_limits table). Times in ms. */
import { sql } from 'drizzle-orm';
import { rateLimits } from '@/db/schema';
import type { Queryable } from './types';

/**
 * Counts one hit on `key` in a window of `windowMs` and returns the count in the current window and when
 * it resets. One atomic upsert: a window that has ended starts again at 1.
 */
export async function hitRateLimit(db: Queryable, key: string, windowMs: number, now = Date.now()): Promise<{ count: number; resetAt: number }> {
  const [row] = await db
    .insert(rateLimits)
    .values({ key, count: 1, resetAt: now + windowMs })
    .onConflictDoUpdate({
      target: rateLimits.key,
      set: {
        count: sql`case when ${rateLimits.resetAt} <= ${now} then 1 else ${rateLimits.count} + 1 end`,
        resetAt: sql`case when ${rateLimits.resetAt} <= ${now} then ${now + windowMs} else ${rateLimits.resetAt} end`,
      },
    })
    .returning({ count: rateLimits.count, resetAt: rateLimits.resetAt });
  if (!row) throw new Error('hitRateLimit returned no row');
  return row;
}

export interface DelayRule {
  /** Attempts admitted one after another; the last of them starts the delay. */
  free: number;
  /** Wait after the `free`-th attempt, ms; it doubles with each further attempt. */
  baseDelayMs: number;
  /** Longest wait, ms. */
  maxDelayMs: number;
  /** The count is forgotten after this long without an admitted attempt, ms. */
  forgetMs: number;
}

export type DelayDecision = { admitted: true; count: number } | { admitted: false; retryAt: number };

/**
 * Admits one attempt on `key` unless it is inside its delay: the n-th admitted attempt (n ≥ `free`) makes the
 * next one wait min(maxDelayMs, baseDelayMs·2^(n−free)). Each step is one atomic statement, so parallel
 * attempts cannot slip through the same gap: a row inserted now admits; else an UPDATE that only matches a
 * row outside its delay admits (and sets the next delay); else the row is inside its delay and says until when.
 */
export async function admitWithDelay(db: Queryable, key: string, rule: DelayRule, now = Date.now()): Promise<DelayDecision> {
  for (let tries = 0; tries < 3; tries++) {
    const [inserted] = await db.insert(rateLimits)
      .values({ key, count: 1, resetAt: now + rule.forgetMs, blockedUntil: rule.free > 1 ? null : now + rule.baseDelayMs })
      .onConflictDoNothing()
      .returning({ count: rateLimits.count });
    if (inserted) return { admitted: true, count: inserted.count };
    const next = sql`case when ${rateLimits.resetAt} <= ${now} then 1 else ${rateLimits.count} + 1 end`;
    const [updated] = await db.update(rateLimits)
      .set({
        count: next,
        resetAt: now + rule.forgetMs,
        blockedUntil: sql`case when ${next} >= ${rule.free}
          then ${now} + min(${rule.maxDelayMs}, ${rule.baseDelayMs} * (1 << min(${next} - ${rule.free}, 30))) else null end`,
      })
      .where(sql`${rateLimits.key} = ${key} and (${rateLimits.blockedUntil} is null or ${rateLimits.blockedUntil} <= ${now} or ${rateLimits.resetAt} <= ${now})`)
      .returning({ count: rateLimits.count });
    if (updated) return { admitted: true, count: updated.count };
    const [row] = await db.select({ blockedUntil: rateLimits.blockedUntil }).from(rateLimits).where(sql`${rateLimits.key} = ${key}`);
    if (row?.blockedUntil && row.blockedUntil > now) return { admitted: false, retryAt: row.blockedUntil };
    // the row was removed (a success cleared it) between the statements: try again
  }
  return { admitted: true, count: 1 };
}

/** Forgets `key` (a successful sign-in clears its pair's count). */
export async function clearRateLimit(db: Queryable, key: string): Promise<void> {
  await db.delete(rateLimits).where(sql`${rateLimits.key} = ${key}`);
}
