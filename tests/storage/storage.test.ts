/**
 * One contract, two back ends: local disk and an S3-compatible bucket (s3rver, a fake S3 server from the npm
 * registry, started here on a free loopback port). SHA-256 values are checked against node:crypto and the
 * FIPS 180-2 test vector for "abc" (ba7816bf…15ad).
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createWriteStream, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { setTimeout as delay } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BlobNotFoundError, BlobTooLargeError, LocalStorage, S3Storage, storageFromEnv, StorageError, type Storage } from '@/lib/storage';
import { startFakeS3, type FakeS3 } from './fake-s3';

const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** A stream that yields `chunks` and then fails, like an upload cut off half way. */
function brokenStream(chunks: Buffer[]): Readable {
  return Readable.from((async function* () {
    for (const c of chunks) { yield c; await delay(5); }
    throw new Error('connection reset by the client');
  })());
}

async function readAll(r: Readable): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const c of r) parts.push(Buffer.from(c as Uint8Array));
  return Buffer.concat(parts);
}

function contract(name: string, make: () => { storage: Storage; leftovers: () => string[] }) {
  describe(name, () => {
    let storage: Storage;
    let leftovers: () => string[];
    beforeAll(() => { ({ storage, leftovers } = make()); });

    it('stores bytes and reads back the same bytes with their SHA-256', async () => {
      const bytes = Buffer.from('abc');
      const put = await storage.put(bytes, { key: 'photos/w1/abc', maxBytes: 100, contentType: 'text/plain' });
      // FIPS 180-2, appendix B.1: SHA-256("abc")
      expect(put.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
      expect(put.size).toBe(3);
      expect(await storage.getBytes('photos/w1/abc')).toEqual(bytes);
      expect(await readAll(await storage.get('photos/w1/abc'))).toEqual(bytes);
      expect((await storage.stat('photos/w1/abc'))?.size).toBe(3);
      expect(await storage.exists('photos/w1/abc')).toBe(true);
    });

    it('streams a large upload in chunks and names it by its hash', async () => {
      const chunks = Array.from({ length: 40 }, (_, i) => Buffer.alloc(64 * 1024, i));
      const whole = Buffer.concat(chunks);
      const put = await storage.put(Readable.from(chunks), { key: (c) => `photos/w1/${c.sha256}`, maxBytes: whole.length });
      expect(put.sha256).toBe(sha(whole));
      expect(put.key).toBe(`photos/w1/${sha(whole)}`);
      expect((await storage.getBytes(put.key)).equals(whole)).toBe(true);
    });

    it('refuses content over the size limit and keeps nothing of it', async () => {
      const err = await storage.put(Buffer.alloc(1001), { key: 'photos/w1/big', maxBytes: 1000 }).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(BlobTooLargeError);
      expect((err as Error).message).toMatch(/larger than the limit of 1000 bytes/);
      expect(await storage.exists('photos/w1/big')).toBe(false);
      expect(leftovers()).toEqual([]);
    });

    it('leaves no partial file when the upload breaks half way', async () => {
      const err = await storage.put(brokenStream([Buffer.alloc(50_000, 1), Buffer.alloc(50_000, 2)]), { key: 'photos/w1/cut', maxBytes: 10 ** 7 })
        .catch((e: unknown) => e);
      expect((err as Error).message).toMatch(/connection reset/);
      expect(await storage.exists('photos/w1/cut')).toBe(false);
      expect(leftovers()).toEqual([]);
    });

    it('says clearly when a key is absent and deletes idempotently', async () => {
      await expect(storage.getBytes('photos/w1/none')).rejects.toBeInstanceOf(BlobNotFoundError);
      await expect(storage.get('photos/w1/none')).rejects.toBeInstanceOf(BlobNotFoundError);
      expect(await storage.stat('photos/w1/none')).toBeNull();
      await storage.put(Buffer.from('x'), { key: 'photos/w1/gone', maxBytes: 10 });
      await storage.delete('photos/w1/gone');
      await storage.delete('photos/w1/gone');
      expect(await storage.exists('photos/w1/gone')).toBe(false);
    });

    it('refuses keys that climb out of the store', async () => {
      for (const key of ['../etc/passwd', '/abs', 'a//b', 'a/../b', 'a b']) {
        await expect(storage.put(Buffer.from('x'), { key, maxBytes: 10 })).rejects.toBeInstanceOf(StorageError);
      }
    });
  });
}

const localRoot = mkdtempSync(join(tmpdir(), 'gridproof-store-'));
afterAll(() => rmSync(localRoot, { recursive: true, force: true }));
contract('local disk', () => {
  const storage = new LocalStorage(localRoot);
  return { storage, leftovers: () => readdirSync(join(localRoot, '.tmp')) };
});

let s3: FakeS3;
const s3Spool = mkdtempSync(join(tmpdir(), 'gridproof-spool-'));
beforeAll(async () => { s3 = await startFakeS3(); });
afterAll(async () => { await s3.stop(); rmSync(s3Spool, { recursive: true, force: true }); });
contract('S3-compatible bucket (s3rver)', () => {
  const storage = new S3Storage({ ...configFrom(s3.env), tmpDir: s3Spool });
  return { storage, leftovers: () => readdirSync(s3Spool) };
});

function configFrom(env: Record<string, string>) {
  const built = storageFromEnv(env);
  expect(built.kind).toBe('s3');
  return {
    bucket: env.S3_BUCKET!, endpoint: env.S3_ENDPOINT, region: env.S3_REGION, accessKeyId: env.S3_ACCESS_KEY_ID,
    secretAccessKey: env.S3_SECRET_ACCESS_KEY, forcePathStyle: true,
  };
}

describe('a full disk', () => {
  it('fails the upload with a clear error and leaves nothing behind', async () => {
    const root = mkdtempSync(join(tmpdir(), 'gridproof-full-'));
    try {
      // /dev/full answers every write with ENOSPC, as a full disk does (Linux, common practice for this test)
      const storage = new LocalStorage(root, { openTemp: (path) => { writeFileSync(path, ''); return createWriteStream('/dev/full'); } });
      const err = await storage.put(Buffer.alloc(200_000, 7), { key: 'photos/w1/full', maxBytes: 10 ** 6 }).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(StorageError);
      expect((err as StorageError).code).toBe('write-failed');
      expect((err as Error).message).toMatch(/ENOSPC|no space/i);
      expect(await storage.exists('photos/w1/full')).toBe(false);
      expect(readdirSync(join(root, '.tmp'))).toEqual([]);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});

describe('a process killed in the middle of a put', () => {
  it('shows no file under the key, and the sweep clears what it left behind', async () => {
    const root = mkdtempSync(join(tmpdir(), 'gridproof-crash-'));
    try {
      const child = spawn(process.execPath, ['--import', 'tsx', 'tests/storage/crash-writer.ts', root], { cwd: process.cwd(), stdio: ['ignore', 'pipe', 'inherit'] });
      await new Promise<void>((resolve) => child.stdout.on('data', (d: Buffer) => { if (d.toString().includes('writing')) resolve(); }));
      child.kill('SIGKILL');
      await new Promise((r) => child.on('exit', r));
      const storage = new LocalStorage(root);
      expect(await storage.exists('photos/w/crash')).toBe(false);
      const left = readdirSync(join(root, '.tmp'));
      expect(left.length).toBe(1);
      expect(await storage.sweepTemp(60_000)).toBe(0); // too fresh: might be a put in progress
      expect(await storage.sweepTemp(0)).toBe(1);
      expect(readdirSync(join(root, '.tmp'))).toEqual([]);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});

describe('choice of back end', () => {
  it('uses local disk unless a bucket is configured', () => {
    expect(storageFromEnv({}).kind).toBe('local');
    expect(storageFromEnv({ S3_BUCKET: 'b', S3_ENDPOINT: 'http://127.0.0.1:1' }).kind).toBe('s3');
  });
});
