/**
 * Database connection. `DATABASE_URL` is a libSQL URL: `file:data/gridproof.db` (default, embedded),
 * `:memory:`, or `libsql://…` / `http://…` for a libSQL server shared by several web and worker processes.
 * No cookies or sessions here: the worker and the tests import this module.
 */
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createClient, type Client, type InArgs, type InStatement, type Transaction, type TransactionMode } from '@libsql/client';
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
  const raw = createClient({ url, authToken, ...(isFile ? { timeout: BUSY_TIMEOUT_MS } : {}) });
  const client = isFile ? serializeLocalWrites(raw) : raw;
  if (isFile) {
    await client.execute('PRAGMA journal_mode = WAL');
    await client.execute(`PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}`);
  }
  await client.execute('PRAGMA foreign_keys = ON');
  return drizzle(client, { schema }) as Db;
}

/**
 * One writer at a time inside this process, for a local file. The driver's calls are synchronous and SQLite's
 * busy wait sleeps inside them, so a write on a second pooled connection while a transaction of this same
 * process is open (awaiting between its statements) would block the event loop for the whole busy timeout,
 * fail with SQLITE_BUSY, and leave that connection unusable. So write statements, batches and write
 * transactions queue here (asynchronously) instead; reads run at once (WAL lets them). Other processes are
 * still kept apart by SQLite's own lock and busy timeout.
 */
export const WRITE_QUEUE_TIMEOUT_MS = 30_000;

function serializeLocalWrites(client: Client): Client {
  let tail: Promise<void> = Promise.resolve();
  const acquire = async (): Promise<() => void> => {
    let release!: () => void;
    const mine = new Promise<void>((r) => { release = r; });
    const prev = tail;
    tail = prev.then(() => mine);
    let timer: NodeJS.Timeout | undefined;
    const waited = await Promise.race([
      prev.then(() => true),
      new Promise<false>((r) => { timer = setTimeout(() => r(false), WRITE_QUEUE_TIMEOUT_MS); }),
    ]);
    clearTimeout(timer);
    if (!waited) {
      void prev.then(release); // keep the queue moving once the holder finishes
      throw new Error(`Waited ${WRITE_QUEUE_TIMEOUT_MS} ms for another write of this process to finish; ` +
        'a transaction was probably left open (or a write was made on the database instead of on the open transaction).');
    }
    let released = false;
    return () => { if (!released) { released = true; release(); } };
  };
  const isRead = (stmt: InStatement | string) => {
    const text = typeof stmt === 'string' ? stmt : stmt.sql;
    return /^\s*(select|explain)\b/i.test(text) || /^\s*pragma\s+[\w.]+\s*(\(\s*[\w.]*\s*\))?\s*;?\s*$/i.test(text);
  };
  const locked = <A extends unknown[], R>(fn: (...args: A) => Promise<R>) => async (...args: A): Promise<R> => {
    const release = await acquire();
    try { return await fn(...args); } finally { release(); }
  };
  return new Proxy(client, {
    get(target, prop) {
      if (prop === 'execute') {
        return (stmt: InStatement | string, args?: InArgs) =>
          isRead(stmt) ? target.execute(stmt as string, args) : locked(() => target.execute(stmt as string, args))();
      }
      if (prop === 'batch') return locked(target.batch.bind(target));
      if (prop === 'migrate') return locked(target.migrate.bind(target));
      if (prop === 'executeMultiple') return locked(target.executeMultiple.bind(target));
      if (prop === 'transaction') {
        return async (mode?: TransactionMode) => {
          if (mode === 'read') return target.transaction(mode);
          const release = await acquire();
          let tx: Transaction;
          try { tx = await target.transaction(mode); } catch (e) { release(); throw e; }
          const end = <A extends unknown[], R>(fn: (...a: A) => R) => (...a: A): R => {
            try {
              const r = fn(...a);
              if (r instanceof Promise) return r.finally(release) as R;
              release();
              return r;
            } catch (e) { release(); throw e; }
          };
          return new Proxy(tx, {
            get(t, p) {
              if (p === 'commit') return end(t.commit.bind(t));
              if (p === 'rollback') return end(t.rollback.bind(t));
              if (p === 'close') return end(t.close.bind(t));
              const v = Reflect.get(t, p, t) as unknown;
              return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(t) : v;
            },
          });
        };
      }
      const v = Reflect.get(target, prop, target) as unknown;
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v;
    },
  });
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
