/**
 * `npm run backup` / `npm run restore` round trip on a real migrated SQLite file and a real local store:
 * the restored database has the same rows and every photo comes back byte for byte (SHA-256 checked, as
 * FIPS 180-4 defines it, through node:crypto). The consistency claim rests on SQLite's documented
 * VACUUM INTO behaviour (one read transaction): a write still open on another connection is not in the copy.
 */
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { createClient } from '@libsql/client';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDb } from '@/db/client';
import { checks, photos, users } from '@/db/schema';
import { backup, MANIFEST } from '@/lib/cli/backup';
import { restore } from '@/lib/cli/restore';
import { intakePhoto } from '@/lib/checks/intake';
import { createBed } from '@/lib/services/beds';
import { LocalStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { newOwner, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

const run = promisify(execFile);
let t: WebTestDb;
let work: string;
let storage: LocalStorage;
let photoBytes: Buffer[];

beforeAll(async () => {
  t = await useFreshDatabase();
  work = mkdtempSync(join(tmpdir(), 'gridproof-backup-'));
  storage = new LocalStorage(join(work, 'store'));
  const owner = await newOwner(t.db, 'Backup shop');
  const bed = await createBed(t.db, owner, { name: 'Bed A', pattern: SMALL_PATTERN });
  photoBytes = [];
  for (const level of [60, 140]) {
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: level, g: level, b: level } } }).jpeg().toBuffer();
    photoBytes.push(jpeg);
    await intakePhoto(t.db, storage, { workshopId: owner.workshopId, bedId: bed.id, userId: owner.user.id, source: jpeg, referenceMm: 150 });
  }
});
afterAll(async () => { await t.close(); rmSync(work, { recursive: true, force: true }); });

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

describe('backup and restore', () => {
  it('round-trips the database and the stored photos into an empty place', async () => {
    const out = join(work, 'b1');
    const m = await backup({ databaseUrl: process.env.DATABASE_URL!, storage, outDir: out });
    expect(m.photos).toHaveLength(2);
    expect(existsSync(join(out, MANIFEST))).toBe(true);

    const targetUrl = `file:${join(work, 'restored', 'gridproof.db')}`;
    const target = new LocalStorage(join(work, 'restored-store'));
    const s = await restore({ fromDir: out, databaseUrl: targetUrl, storage: target });
    expect(s.photos).toBe(2);
    const db = await openDb(targetUrl);
    try {
      const [a, b] = await Promise.all([t.db.select().from(photos), db.select().from(photos)]);
      expect(b.map((p) => p.id).sort()).toEqual(a.map((p) => p.id).sort());
      expect((await db.select().from(checks)).length).toBe((await t.db.select().from(checks)).length);
      expect((await db.select().from(users)).length).toBe(1);
      for (const p of b) expect(sha(await target.getBytes(p.storageKey))).toBe(p.sha256);
      expect(b.map((p) => p.sha256).sort()).toEqual(photoBytes.map(sha).sort());
    } finally {
      db.$client.close();
    }
  });

  it('copies the database as of one instant: a write still open elsewhere is not in the copy', async () => {
    const other = createClient({ url: process.env.DATABASE_URL! });
    const tx = await other.transaction('write');
    try {
      await tx.execute({ sql: 'UPDATE workshops SET name = ?', args: ['half-way name'] });
      const out = join(work, 'b2');
      await backup({ databaseUrl: process.env.DATABASE_URL!, storage, outDir: out });
      const copy = createClient({ url: `file:${join(out, 'gridproof.db')}` });
      const r = await copy.execute('SELECT name FROM workshops');
      copy.close();
      expect(r.rows.map((x) => x.name)).toEqual(['Backup shop']);
    } finally {
      await tx.rollback();
      other.close();
    }
  });

  it('refuses a backup folder without its manifest and a damaged photo, and restores nothing', async () => {
    const out = join(work, 'b3');
    await backup({ databaseUrl: process.env.DATABASE_URL!, storage, outDir: out });
    const manifest = JSON.parse(readFileSync(join(out, MANIFEST), 'utf8')) as { photos: { key: string }[] };
    const first = manifest.photos[0]!.key;
    writeFileSync(join(out, 'storage', ...first.split('/')), 'not the photo');
    const targetUrl = `file:${join(work, 'r3', 'gridproof.db')}`;
    const target = new LocalStorage(join(work, 'r3-store'));
    await expect(restore({ fromDir: out, databaseUrl: targetUrl, storage: target })).rejects.toThrow(/SHA-256/);
    expect(existsSync(join(work, 'r3', 'gridproof.db'))).toBe(false);
    expect(await target.exists(first)).toBe(false);
    rmSync(join(out, MANIFEST));
    await expect(restore({ fromDir: out, databaseUrl: targetUrl, storage: target })).rejects.toThrow(/not a finished/);
  });

  it('runs from the command line, and restore will not replace a database without --force', async () => {
    const out = join(work, 'b4');
    const env: NodeJS.ProcessEnv = { ...process.env, STORAGE_DIR: storage.root };
    const b = await run('npx', ['tsx', 'lib/cli/backup.ts', '--out', out], { env, cwd: process.cwd() });
    expect(JSON.parse(b.stdout)).toMatchObject({ ok: true, photos: 2 });
    const targetDb = join(work, 'r4', 'gridproof.db');
    const renv: NodeJS.ProcessEnv = { ...env, DATABASE_URL: `file:${targetDb}`, STORAGE_DIR: join(work, 'r4-store') };
    const r = await run('npx', ['tsx', 'lib/cli/restore.ts', '--from', out], { env: renv });
    expect(JSON.parse(r.stdout)).toMatchObject({ ok: true, photos: 2 });
    const again = await run('npx', ['tsx', 'lib/cli/restore.ts', '--from', out], { env: renv }).catch((e: { code: number; stderr: string }) => e);
    expect((again as { code: number }).code).toBe(1);
    expect((again as { stderr: string }).stderr).toMatch(/--force/);
  });
});
