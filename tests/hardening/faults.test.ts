/**
 * Faults: the database locked by another process (retried, then a clear 503 and nothing saved), storage that
 * fails mid-write with ENOSPC (a real file system stream that stops with the errno a full disk gives, as
 * write(2) documents it), and a web process killed in the middle of an upload (nothing half written is
 * shown). Real migrated SQLite file, real local storage, real child processes. Worker SIGKILL and lease
 * expiry are covered by tests/workers/processes.test.ts and tests/workers/analysis.test.ts.
 */
import { spawn } from 'node:child_process';
import { createWriteStream, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { Writable } from 'node:stream';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as listGet, POST as uploadPost } from '@/app/api/beds/[id]/checks/route';
import { checks, jobs, photos } from '@/db/schema';
import { uploadCheck } from '@/lib/checks/api';
import { errorResponse, toAppError } from '@/lib/http/errors';
import type { Actor } from '@/lib/services/actor';
import { createBed } from '@/lib/services/beds';
import { LocalStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { noiseRaw } from '@/tests/fixtures/make-bad-inputs';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

let t: WebTestDb;
let machinist: Actor;
let cookie: string;
let bedId: string;

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  const owner = await newOwner(t.db, 'Faults shop');
  machinist = await addMember(t.db, owner.workshopId, 'machinist');
  cookie = await sessionCookie(t.db, machinist);
  bedId = (await createBed(t.db, owner, { name: 'Bed', pattern: SMALL_PATTERN })).id;
});
afterAll(async () => { await t.close(); });

let shade = 10;
async function photo(): Promise<Buffer> {
  shade += 7;
  return sharp({ create: { width: 80, height: 60, channels: 3, background: { r: shade % 255, g: 90, b: 60 } } }).jpeg().toBuffer();
}
function uploadRequest(bytes: Buffer): Request {
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), 'bed.jpg');
  form.append('referenceMm', '150');
  return new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie, host: 'gridproof.test' }, body: form });
}
function files(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => { for (const n of readdirSync(d)) { const p = join(d, n); if (statSync(p).isDirectory()) walk(p); else out.push(relative(dir, p)); } };
  try { walk(dir); } catch { /* no folder yet */ }
  return out;
}
async function counts() {
  return { photos: (await t.db.select().from(photos)).length, checks: (await t.db.select().from(checks)).length, jobs: (await t.db.select().from(jobs)).length };
}

/** Another process holding SQLite's write lock for `ms` (BEGIN IMMEDIATE … COMMIT); resolves once it holds it. */
function holdWriteLock(ms: number): Promise<{ done: Promise<void> }> {
  const code = `
    const { createClient } = require('@libsql/client');
    (async () => {
      const c = createClient({ url: process.env.DATABASE_URL });
      const tx = await c.transaction('write'); // BEGIN IMMEDIATE: takes the write lock now
      await tx.execute("UPDATE workshops SET name = name");
      process.stdout.write('locked\\n');
      await new Promise((r) => setTimeout(r, ${ms}));
      await tx.commit();
      c.close();
    })();`;
  const child = spawn(process.execPath, ['-e', code], { cwd: process.cwd(), env: process.env, stdio: ['ignore', 'pipe', 'inherit'] });
  const done = new Promise<void>((r) => child.on('exit', () => r()));
  return new Promise((resolve) => child.stdout!.on('data', (d: Buffer) => { if (d.toString().includes('locked')) resolve({ done }); }));
}

describe('database busy or locked', () => {
  it('waits for a short lock by another process and then saves the upload', async () => {
    const before = await counts();
    const lock = await holdWriteLock(800);
    const res = await uploadPost(uploadRequest(await photo()), { params: Promise.resolve({ id: bedId }) });
    await lock.done;
    expect(res.status).toBe(202);
    expect(await counts()).toEqual({ photos: before.photos + 1, checks: before.checks + 1, jobs: before.jobs + 1 });
  });

  it('gives up on a long lock with a clear 503 and leaves no photo behind', async () => {
    process.env.DB_BUSY_RETRY_MS = '300';
    const before = await counts();
    const filesBefore = files(t.storeDir).filter((f) => !f.startsWith('.tmp')).sort();
    const lock = await holdWriteLock(6500); // longer than the 5 s busy timeout plus the retry budget
    const res = await uploadPost(uploadRequest(await photo()), { params: Promise.resolve({ id: bedId }) });
    const body = (await res.json()) as { error?: { code: string; message: string } };
    await lock.done;
    delete process.env.DB_BUSY_RETRY_MS;
    expect([res.status, body.error?.code], JSON.stringify(body)).toEqual([503, 'busy']);
    expect(body.error?.message).toMatch(/Nothing was saved/);
    expect(await counts()).toEqual(before);
    expect(files(t.storeDir).filter((f) => !f.startsWith('.tmp')).sort()).toEqual(filesBefore);
  }, 30_000);
});

/** A real write stream that stores `limit` bytes and then fails the way a full disk does (ENOSPC). */
function fullDiskAfter(limit: number) {
  return (path: string) => {
    const file = createWriteStream(path, { flags: 'wx' });
    let written = 0;
    return new Writable({
      write(chunk: Buffer, _enc, cb) {
        if (written + chunk.length > limit) {
          const room = limit - written;
          written = limit;
          file.write(chunk.subarray(0, Math.max(0, room)), () => cb(Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC', errno: -28, syscall: 'write' })));
          return;
        }
        written += chunk.length;
        file.write(chunk, cb);
      },
      final(cb) { file.end(cb); },
      destroy(err, cb) { file.destroy(); cb(err); },
    });
  };
}

describe('storage write failure', () => {
  it('fails the upload with a clear 503 when the disk fills mid-write, and leaves no file and no row', async () => {
    const root = mkdtempSync(join(tmpdir(), 'gridproof-full-'));
    const full = new LocalStorage(root, { openTemp: fullDiskAfter(20_000) });
    const before = await counts();
    const big = await sharp(noiseRaw(900, 700), { raw: { width: 900, height: 700, channels: 3 } }).jpeg({ quality: 95 }).toBuffer();
    expect(big.length).toBeGreaterThan(20_000);
    let res: Response;
    try {
      await uploadCheck(t.db, full, machinist, bedId, uploadRequest(big));
      throw new Error('the upload should have failed');
    } catch (e) {
      res = errorResponse(toAppError(e));
    }
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect([res.status, body.error.code]).toEqual([503, 'storage_failed']);
    expect(body.error.message).toMatch(/Nothing was saved/);
    expect(files(root)).toEqual([]); // the temp part is gone too
    expect(await counts()).toEqual(before);
    rmSync(root, { recursive: true, force: true });
  });
});

describe('web process restart during an upload', () => {
  it('shows nothing half written after the process is killed mid-upload', async () => {
    const before = await counts();
    const child = spawn(process.execPath, ['--import', 'tsx', 'tests/hardening/upload-child.ts', bedId, machinist.workshopId, machinist.user.id], {
      cwd: process.cwd(), env: process.env, stdio: ['ignore', 'pipe', 'pipe'],
    });
    let err = '';
    child.stderr!.on('data', (d: Buffer) => { err += d.toString(); });
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`child never wrote: ${err}`)), 20_000);
      child.stdout!.on('data', (d: Buffer) => { if (d.toString().includes('writing')) { clearTimeout(timer); resolve(); } });
    });
    const parts = files(join(t.storeDir, '.tmp'));
    expect(parts.length).toBeGreaterThan(0); // it really was half way
    child.kill('SIGKILL');
    await new Promise((r) => child.on('exit', r));

    expect(await counts()).toEqual(before);
    const list = await call(listGet, { cookie, params: { id: bedId } });
    expect((list.json as { checks: unknown[] }).checks).toHaveLength(before.checks);
    const visible = files(t.storeDir).filter((f) => !f.startsWith('.tmp'));
    expect(visible.length).toBe(before.photos); // only the finished photos of earlier tests
    // the part is swept when a worker starts (older than its threshold; 0 here)
    expect(await new LocalStorage(t.storeDir).sweepTemp(0)).toBeGreaterThan(0);
    expect(files(join(t.storeDir, '.tmp'))).toEqual([]);
  }, 30_000);
});
