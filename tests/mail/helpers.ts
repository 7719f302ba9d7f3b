/** Shared set-up for the mail tests: a migrated SQLite database in a temp dir and a free local port. */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { migrateDb, openDb, type Db } from '@/db/client';
import { workshops } from '@/db/schema';

export async function tempDir(prefix: string): Promise<{ dir: string; cleanup: () => Promise<void> }> {
  const dir = await mkdtemp(join(tmpdir(), `gridproof-${prefix}-`));
  return { dir, cleanup: () => rm(dir, { recursive: true, force: true }) };
}

/** A real migrated database file in `dir`, with one workshop. */
export async function migratedDb(dir: string): Promise<{ db: Db; workshopId: string }> {
  const db = await openDb(`file:${join(dir, 'test.db')}`);
  await migrateDb(db);
  const workshopId = 'ws-1';
  await db.insert(workshops).values({ id: workshopId, name: 'North Bench <Shop>' });
  return { db, workshopId };
}

