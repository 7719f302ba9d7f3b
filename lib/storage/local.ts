/**
 * Blobs on local disk under one root folder (default data/storage). A put streams into a temp file in
 * `<root>/.tmp` (same file system) and renames it into place, so a key shows the whole file or nothing; a
 * failed put removes its temp file.
 */
import { createReadStream } from 'node:fs';
import { mkdir, readdir, readFile, rename, rm, stat } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import type { Readable } from 'node:stream';
import { type OpenTemp, spoolToTempFile } from './spool';
import { assertValidKey, BlobNotFoundError, type BlobSource, type BlobStat, type PutOptions, type PutResult, type Storage, StorageError } from './types';

export class LocalStorage implements Storage {
  readonly kind = 'local' as const;
  readonly root: string;
  readonly tmpDir: string;

  private readonly openTemp: OpenTemp | undefined;

  constructor(root: string, options: { openTemp?: OpenTemp } = {}) {
    this.root = resolve(root);
    this.openTemp = options.openTemp;
    this.tmpDir = join(this.root, '.tmp');
  }

  private pathOf(key: string): string {
    assertValidKey(key);
    return join(this.root, ...key.split('/'));
  }

  async put(source: BlobSource, options: PutOptions): Promise<PutResult> {
    if (typeof options.key === 'string') assertValidKey(options.key);
    const spooled = await spoolToTempFile(source, this.tmpDir, options.maxBytes, this.openTemp);
    try {
      const key = typeof options.key === 'string' ? options.key : options.key({ sha256: spooled.sha256, size: spooled.size });
      const target = this.pathOf(key);
      await mkdir(dirname(target), { recursive: true });
      await rename(spooled.path, target);
      return { key, size: spooled.size, sha256: spooled.sha256 };
    } catch (e) {
      await rm(spooled.path, { force: true });
      if (e instanceof StorageError) throw e;
      throw new StorageError('write-failed', `Could not store the file: ${(e as Error).message}`, { cause: e });
    }
  }

  async get(key: string): Promise<Readable> {
    const path = this.pathOf(key);
    if (!(await this.stat(key))) throw new BlobNotFoundError(key);
    return createReadStream(path);
  }

  async getBytes(key: string): Promise<Buffer> {
    try {
      return await readFile(this.pathOf(key));
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw new BlobNotFoundError(key);
      throw new StorageError('read-failed', `Could not read the stored file: ${(e as Error).message}`, { cause: e });
    }
  }

  async stat(key: string): Promise<BlobStat | null> {
    try {
      const s = await stat(this.pathOf(key));
      return s.isFile() ? { size: s.size } : null;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
      throw e;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.stat(key)) !== null;
  }

  async delete(key: string): Promise<void> {
    await rm(this.pathOf(key), { force: true });
  }

  /**
   * Removes temp files left by a process that died in the middle of a put (older than `olderThanMs`, so a
   * put in progress elsewhere is left alone). Returns how many were removed. Called when a worker starts.
   */
  async sweepTemp(olderThanMs = 60 * 60_000, now = Date.now()): Promise<number> {
    let names: string[];
    try {
      names = await readdir(this.tmpDir);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return 0;
      throw e;
    }
    let removed = 0;
    for (const name of names) {
      if (!name.startsWith('.part-')) continue;
      const path = join(this.tmpDir, name);
      const s = await stat(path).catch(() => null);
      if (s && now - s.mtimeMs >= olderThanMs) {
        await rm(path, { force: true });
        removed++;
      }
    }
    return removed;
  }
}
