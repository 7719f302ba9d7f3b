/**
 * Database connection. `DATABASE_URL` is a libSQL URL: `file:data/gridproof.db` (default, embedded),
 * `:memory:`, or `libsql://…` / `http://…` for a libSQL server shared by several web and worker processes.
 * No cookies or sessions here: the worker and the tests import this module.
 */
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createClient, type Client } from '@libsql/client';
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql';
import { migrate } from 'drizzle-orm/libsql/migrator';
import * as schema from './schema';

export type Db = LibSQLDatabase<typeof schema> & { $client: Client };

export const DEFAULT_DATABASE_URL = 'file:data/gridproof.db';

/** How long a local-file connection waits for another writer's lock before SQLITE_BUSY, ms. */
export const BUSY_TIMEOUT_MS = 5000;

/** Folder of the committed migrations (drizzle/), resolved from this file so any cwd works. */
export const MIGRATIONS_FOLDER = resolve(dirname(fileURLToPath(import.meta.url)), '..', 'drizzle');

/** Opens a database at `url`; for a local file it creates the folder and sets WAL and a busy timeout. */
export async function openDb(url: string = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, authToken = process.env.DATABASE_AUTH_TOKEN): Promise<Db> {
  const isFile = url.startsWith('file:');
  if (isFile) {
    const path = url.slice('file:'.length);
    if (path && path !== ':memory:') mkdirSync(dirname(resolve(path)), { recursive: true });
  }
  // The local client keeps a pool of connections; a PRAGMA reaches only the one connection it ran on, so the
  // busy timeout is given as the client's `timeout` option, which every pooled connection is opened with.
  const client = createClient({ url, authToken, ...(isFile ? { timeout: BUSY_TIMEOUT_MS } : {}) });
  if (isFile) {
    await client.execute('PRAGMA journal_mode = WAL');
    await client.execute(`PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}`);
  }
  await client.execute('PRAGMA foreign_keys = ON');
  return drizzle(client, { schema }) as Db;
}

/** Applies the committed migrations in drizzle/ (idempotent). */
export async function migrateDb(db: Db): Promise<void> {
  await migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
}

let shared: Promise<Db> | undefined;

/** The process-wide database named by `DATABASE_URL`, opened once. */
export function getDb(): Promise<Db> {
  shared ??= openDb();
  return shared;
}

/** Closes the process-wide database (tests and CLIs). */
export async function closeDb(): Promise<void> {
  if (!shared) return;
  const db = await shared;
  shared = undefined;
  db.$client.close();
}

export { schema };
