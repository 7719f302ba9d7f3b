/**
 * The database client on a local file: writes of one process queue behind its open transaction instead of
 * blocking the event loop in SQLite's busy wait (which the driver runs synchronously) and then failing.
 */
import { setTimeout as delay } from 'node:timers/promises';
import { describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { tempDb } from '../queue/helpers';

describe('local database client', () => {
  it('queues a write behind an open transaction of the same process without freezing the event loop', async () => {
    const t = await tempDb();
    try {
      let ticks = 0;
      const iv = setInterval(() => ticks++, 5);
      const t0 = Date.now();
      const order: string[] = [];
      const tx = t.db.transaction(async (q) => {
        await q.run(sql`INSERT INTO rate_limits (key, count, reset_at) VALUES ('a', 1, 0)`);
        await delay(150);
        order.push('tx');
      });
      await delay(10);
      const write = t.db.run(sql`INSERT INTO rate_limits (key, count, reset_at) VALUES ('b', 1, 0)`).then(() => order.push('write'));
      const read = t.db.all(sql`SELECT count(*) AS n FROM rate_limits`).then(() => { order.push('read'); return Date.now() - t0; });
      const [, , readMs] = await Promise.all([tx, write, read]);
      clearInterval(iv);
      expect(order).toEqual(['read', 'tx', 'write']);
      expect(readMs).toBeLessThan(150); // the read did not wait for the transaction
      expect(ticks).toBeGreaterThan(10); // timers kept running while the write waited
      expect(Date.now() - t0).toBeLessThan(2000); // far below the 5 s busy timeout
      const rows = await t.db.all<{ key: string }>(sql`SELECT key FROM rate_limits ORDER BY key`);
      expect(rows.map((r) => r.key)).toEqual(['a', 'b']);
    } finally {
      t.close();
    }
  });

  it('releases the queue when a transaction rolls back', async () => {
    const t = await tempDb();
    try {
      await expect(t.db.transaction(async (q) => {
        await q.run(sql`INSERT INTO rate_limits (key, count, reset_at) VALUES ('a', 1, 0)`);
        throw new Error('changed my mind');
      })).rejects.toThrow('changed my mind');
      await t.db.run(sql`INSERT INTO rate_limits (key, count, reset_at) VALUES ('c', 1, 0)`);
      const rows = await t.db.all<{ key: string }>(sql`SELECT key FROM rate_limits`);
      expect(rows.map((r) => r.key)).toEqual(['c']);
    } finally {
      t.close();
    }
  });
});
