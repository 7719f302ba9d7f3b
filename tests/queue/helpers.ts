/** A fresh, migrated SQLite file in a temp folder for each test that asks (no mocked database). */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { migrateDb, openDb, type Db } from '@/db/client';

export interface TempDb { db: Db; url: string; dir: string; close: () => void }

export async function tempDb(): Promise<TempDb> {
  const dir = mkdtempSync(join(tmpdir(), 'gridproof-q-'));
  const url = `file:${join(dir, 'test.db')}`;
  const db = await openDb(url);
  await migrateDb(db);
  return {
    db, url, dir,
    close: () => { db.$client.close(); rmSync(dir, { recursive: true, force: true }); },
  };
}
