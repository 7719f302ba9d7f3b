/**
 * CLI: `npm run backup -- [--out DIR]` — a consistent copy of the database and of every stored photo.
 *
 * 1. The database (DATABASE_URL, a local `file:` SQLite) is copied with `VACUUM INTO` (SQLite docs, "VACUUM
 *    INTO"): one read transaction, so the copy is the database as of one instant even while the web app and
 *    workers keep writing (WAL lets them).
 * 2. The photos named by that copy's `photos` rows are read from storage (local disk or S3, lib/storage) and
 *    written under `DIR/storage/<key>`, each checked against its SHA-256 in the row. A photo stored after the
 *    snapshot is not in it and is not needed by it; derived images (display copies) are made again on demand.
 * 3. `DIR/manifest.json` lists what was written; it is written last, so a folder without it is unfinished.
 * Default DIR: `data/backups/<UTC time>`. Prints the manifest summary as JSON. Exit 0, or 1 with a message.
 * A libSQL server (`libsql://`, `http://`) has its own backups (its snapshots); this CLI refuses it.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdir, readdir, rename, stat, writeFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createClient } from '@libsql/client';
import { DEFAULT_DATABASE_URL } from '@/db/client';
import { assertValidKey, storageFromEnv, type Storage } from '@/lib/storage';
import { parseCliArgs, type CliUsage } from './args';

export const MANIFEST = 'manifest.json';
export const DB_FILE = 'gridproof.db';

export interface BackupManifest {
  format: 'gridproof-backup';
  version: 1;
  createdAt: string;
  database: { file: string; bytes: number };
  photos: { key: string; sha256: string; bytes: number }[];
}

/** The file path of a local `file:` database URL; throws for a server URL or :memory:. */
export function localDbPath(url: string): string {
  if (!url.startsWith('file:')) throw new Error(`backup/restore work on a local SQLite file; ${url.split(':')[0]}: databases have their own snapshots.`);
  const path = url.slice('file:'.length).split('?')[0] ?? '';
  if (!path || path === ':memory:') throw new Error('An in-memory database cannot be backed up.');
  return resolve(path);
}

const sqlString = (s: string) => `'${s.replace(/'/g, "''")}'`;

/** Writes a backup of `databaseUrl` and `storage` into `outDir` (which must not exist or be empty). */
export async function backup(opts: { databaseUrl: string; storage: Storage; outDir: string }): Promise<BackupManifest> {
  localDbPath(opts.databaseUrl);
  const out = resolve(opts.outDir);
  if (existsSync(out) && (await readdir(out)).length > 0) throw new Error(`${out} is not empty; choose a new folder.`);
  await mkdir(join(out, 'storage'), { recursive: true });
  const dbOut = join(out, DB_FILE);

  const live = createClient({ url: opts.databaseUrl, timeout: 5000 });
  try {
    await live.execute(`VACUUM INTO ${sqlString(dbOut)}`);
  } finally {
    live.close();
  }

  const snapshot = createClient({ url: `file:${dbOut}` });
  const photos: BackupManifest['photos'] = [];
  try {
    const rows = await snapshot.execute('SELECT DISTINCT storage_key, sha256 FROM photos ORDER BY storage_key');
    for (const row of rows.rows) {
      const key = String(row.storage_key);
      const sha256 = String(row.sha256);
      assertValidKey(key);
      const bytes = await opts.storage.getBytes(key);
      const actual = createHash('sha256').update(bytes).digest('hex');
      if (actual !== sha256) throw new Error(`Stored photo ${key} does not match its SHA-256 (storage damaged?); backup stopped.`);
      const target = join(out, 'storage', ...key.split('/'));
      await mkdir(dirname(target), { recursive: true });
      await writeFile(target, bytes);
      photos.push({ key, sha256, bytes: bytes.length });
    }
  } finally {
    snapshot.close();
  }
  const { size } = await stat(dbOut);
  const manifest: BackupManifest = {
    format: 'gridproof-backup',
    version: 1,
    createdAt: new Date().toISOString(),
    database: { file: DB_FILE, bytes: size },
    photos,
  };
  // written last, through a rename, so a folder with a manifest is a finished backup
  await writeFile(join(out, `${MANIFEST}.part`), JSON.stringify(manifest, null, 2));
  await rename(join(out, `${MANIFEST}.part`), join(out, MANIFEST));
  return manifest;
}

const cli: CliUsage = {
  name: 'backup',
  usage: `
Copies the database and every stored photo into a folder, checksummed, and prints a JSON summary.

  npm run backup -- [--out DIR]

  --out DIR    where the backup goes (default data/backups/<time stamp>)
  -h, --help   this text

Reads DATABASE_URL and the storage settings (STORAGE_DIR, or S3_BUCKET and the other S3_* variables) as the app does.`,
};

async function main() {
  const args = parseCliArgs(cli, { out: { type: 'string' } });
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const outDir = args.out ?? join('data', 'backups', stamp);
  const m = await backup({ databaseUrl: process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, storage: storageFromEnv(), outDir });
  process.stdout.write(`${JSON.stringify({ ok: true, dir: resolve(outDir), databaseBytes: m.database.bytes, photos: m.photos.length, photoBytes: m.photos.reduce((s, p) => s + p.bytes, 0) })}\n`);
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  main().catch((e: unknown) => {
    process.stderr.write(`backup: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exit(1);
  });
}
