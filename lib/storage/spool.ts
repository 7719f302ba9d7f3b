/**
 * Streams a source into a temporary file in `dir`, counting and hashing (SHA-256) as it goes, and refusing
 * more than `maxBytes`. On any failure the temporary file is removed before the error is passed on.
 */
import { createHash, randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, rm } from 'node:fs/promises';
import { join } from 'node:path';
import { Readable, Transform, type Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { BlobTooLargeError, type BlobSource, StorageError } from './types';

export interface Spooled { path: string; size: number; sha256: string }

/** Opens the temp file for writing; replaceable so that tests can write to /dev/full (a real ENOSPC). */
export type OpenTemp = (path: string) => Writable;
const defaultOpenTemp: OpenTemp = (path) => createWriteStream(path, { flags: 'wx' });

function toReadable(source: BlobSource): Readable {
  if (source instanceof Uint8Array) return Readable.from([source]);
  if (source instanceof Readable) return source;
  return Readable.from(source);
}

/** Writes `source` to a fresh temp file under `dir` (created if needed). */
export async function spoolToTempFile(source: BlobSource, dir: string, maxBytes: number, openTemp: OpenTemp = defaultOpenTemp): Promise<Spooled> {
  await mkdir(dir, { recursive: true });
  const path = join(dir, `.part-${process.pid}-${randomBytes(8).toString('hex')}`);
  const hash = createHash('sha256');
  let size = 0;
  const meter = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      size += chunk.length;
      if (size > maxBytes) return cb(new BlobTooLargeError(maxBytes));
      hash.update(chunk);
      cb(null, chunk);
    },
  });
  try {
    await pipeline(toReadable(source), meter, openTemp(path));
  } catch (e) {
    await rm(path, { force: true });
    if (e instanceof StorageError) throw e;
    // errors raised by the source itself (a broken upload) keep their identity for the caller
    if ((e as NodeJS.ErrnoException).code && /^E[A-Z]+$/.test(String((e as NodeJS.ErrnoException).code))) {
      throw new StorageError('write-failed', `Could not store the file: ${(e as Error).message}`, { cause: e });
    }
    throw e;
  }
  return { path, size, sha256: hash.digest('hex') };
}
