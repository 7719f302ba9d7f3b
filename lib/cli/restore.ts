/**
 * CLI: `npm run restore -- --from DIR [--force]` — brings back a backup made by `npm run backup`.
 *
 * Stop the web app and the workers first: restore replaces the database file under them.
 * 1. The backup is checked first: its manifest must be there (a backup cut short has none), every photo it
 *    lists must be present with its SHA-256, and the database copy must pass `PRAGMA integrity_check`.
 * 2. The photos are put back into storage (local or S3) under their keys (a put is whole or nothing).
 * 3. The database file is replaced: the copy is written next to the target and renamed over it, and the old
 *    WAL/SHM files are removed, so the target is either the old database or the restored one, never a mix.
 * An existing database is only replaced with `--force`. Prints a JSON summary; exit 0, or 1 with a message (2 for
 * bad usage; `--help` prints the usage).
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { copyFile, mkdir, readFile, rename, rm } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createClient } from '@libsql/client';
import { z } from 'zod';
import { DEFAULT_DATABASE_URL } from '@/db/client';
import { assertValidKey, storageFromEnv, type Storage } from '@/lib/storage';
import { exitWithUsageError, parseCliArgs, type CliUsage } from './args';
import { DB_FILE, localDbPath, MANIFEST } from './backup';

const ManifestSchema = z.object({
  format: z.literal('gridproof-backup'),
  version: z.literal(1),
  createdAt: z.string(),
  database: z.object({ file: z.literal(DB_FILE), bytes: z.number().int().nonnegative() }),
  photos: z.array(z.object({ key: z.string(), sha256: z.string().regex(/^[0-9a-f]{64}$/), bytes: z.number().int().nonnegative() })),
});

export interface RestoreSummary {
  database: string;
  photos: number;
  photoBytes: number;
}

/** Restores the backup in `fromDir` into `databaseUrl` and `storage` (see the module header). */
export async function restore(opts: { fromDir: string; databaseUrl: string; storage: Storage; force?: boolean }): Promise<RestoreSummary> {
  const from = resolve(opts.fromDir);
  const target = localDbPath(opts.databaseUrl);
  let manifestText: string;
  try {
    manifestText = await readFile(join(from, MANIFEST), 'utf8');
  } catch {
    throw new Error(`${from} has no ${MANIFEST}: not a finished Gridproof backup.`);
  }
  const manifest = ManifestSchema.parse(JSON.parse(manifestText));
  if (existsSync(target) && !opts.force) throw new Error(`${target} exists; stop the app and pass --force to replace it.`);

  const copy = join(from, DB_FILE);
  const check = createClient({ url: `file:${copy}` });
  try {
    const r = await check.execute('PRAGMA integrity_check');
    if (String(r.rows[0]?.[0]) !== 'ok') throw new Error(`The database copy in ${from} is damaged: ${String(r.rows[0]?.[0])}`);
  } finally {
    check.close();
  }

  const blobs: { key: string; bytes: Buffer }[] = [];
  for (const p of manifest.photos) {
    assertValidKey(p.key);
    const bytes = await readFile(join(from, 'storage', ...p.key.split('/')));
    if (createHash('sha256').update(bytes).digest('hex') !== p.sha256) throw new Error(`Photo ${p.key} in the backup does not match its SHA-256; nothing was restored.`);
    blobs.push({ key: p.key, bytes });
  }
  for (const b of blobs) await opts.storage.put(b.bytes, { key: b.key, maxBytes: b.bytes.length });

  await mkdir(dirname(target), { recursive: true });
  const part = `${target}.restore-part`;
  await copyFile(copy, part);
  await rm(`${target}-wal`, { force: true });
  await rm(`${target}-shm`, { force: true });
  await rename(part, target);
  return { database: target, photos: blobs.length, photoBytes: blobs.reduce((s, b) => s + b.bytes.length, 0) };
}

const cli: CliUsage = {
  name: 'restore',
  usage: `
Brings back a backup made by \`npm run backup\`: checks every file against the manifest, then puts the photos
into storage and the database in place. Prints a JSON summary.

  npm run restore -- --from DIR [--force]

  --from DIR   the backup folder (the one holding the manifest)
  --force      replace an existing database (stop the app first)
  -h, --help   this text

Reads DATABASE_URL and the storage settings (STORAGE_DIR, or S3_BUCKET and the other S3_* variables) as the app does.`,
};

async function main() {
  const args = parseCliArgs(cli, { from: { type: 'string' }, force: { type: 'boolean' } });
  if (!args.from) exitWithUsageError(cli.name, 'needs --from DIR (see --help)');
  const s = await restore({ fromDir: args.from, databaseUrl: process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, storage: storageFromEnv(), force: args.force === true });
  process.stdout.write(`${JSON.stringify({ ok: true, ...s })}\n`);
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  main().catch((e: unknown) => {
    process.stderr.write(`restore: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exit(1);
  });
}
