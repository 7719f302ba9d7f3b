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
