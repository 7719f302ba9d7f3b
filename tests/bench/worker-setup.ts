/**
 * What the benches that run real worker processes share (check.bench.ts, worker.bench.ts): a fresh database file and
 * storage in a temporary folder, the invented demo bed they measure (20 mm dog holes on a 96 mm grid in two panels)
 * with a workshop, member and bed on it, the environment a bench worker runs with, and waiting for a check to end.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import { fileURLToPath } from 'node:url';
import { migrateDb, openDb, type Db } from '@/db/client';
import { getCheckById } from '@/db/queries/checks';
import type { Pattern } from '@/lib/geometry/contract';
import { LocalStorage } from '@/lib/storage';
import { makeShop, type Shop } from '@/tests/checks/fixtures';

/** The repository's root (where `workers/worker.ts` is run from). */
export const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/** Invented demo bed: 20 mm dog holes on a 96 mm grid in two panels (bed mm). */
export const BENCH_DOG_BED: Pattern = {
  version: 1, name: 'bench dog bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
  panels: [{ id: 'L', x: 0, y: 0, width: 480, height: 672 }, { id: 'R', x: 480, y: 0, width: 480, height: 672 }],
};

export interface BenchShop {
  dir: string;
  url: string;
  storageDir: string;
  db: Db;
  storage: LocalStorage;
  shop: Shop;
}

/** A migrated database file and local storage under a new temporary folder, with a shop on the demo bed. */
export async function benchShop(name: string): Promise<BenchShop> {
  const dir = mkdtempSync(join(tmpdir(), `gridproof-bench-${name}-`));
  const url = `file:${join(dir, 'bench.db')}`;
  const storageDir = join(dir, 'storage');
  const db = await openDb(url);
  await migrateDb(db);
  const shop = await makeShop(db, 'bench', BENCH_DOG_BED);
  return { dir, url, storageDir, db, storage: new LocalStorage(storageDir), shop };
}

/** The environment of a bench worker on `b`'s database and storage: production mode, quick polling, no mail. */
export function benchWorkerEnv(b: BenchShop, workerId: string, extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return { ...process.env, DATABASE_URL: b.url, STORAGE_DIR: b.storageDir, WORKER_ID: workerId, WORKER_POLL_MS: '20', NODE_ENV: 'production', MAIL_DELIVERY: '0', ...extra };
}

/** The check once it is done, needs review or failed (polled every `pollMs`). */
export async function waitForCheck(db: Db, id: string, pollMs = 10) {
  for (;;) {
    const c = await getCheckById(db, id);
    if (c && ['done', 'needs-review', 'failed'].includes(c.status)) return c;
    await delay(pollMs);
  }
}
