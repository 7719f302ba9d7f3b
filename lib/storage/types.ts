/**
 * The one interface to stored blobs (uploaded photos, derived images). Two back ends: local disk
 * (`LocalStorage`, default, under data/storage) and any S3-compatible bucket (`S3Storage`).
 *
 * Keys are relative, slash-separated paths of `[A-Za-z0-9._-]` segments (no `..`, no leading slash), e.g.
 * `photos/<workshopId>/<sha256>`. A `put` either stores the whole object under its key or nothing: no reader
 * ever sees a partial object, and a failed or refused write leaves nothing behind.
 */
import type { Readable } from 'node:stream';

/** What can be stored: bytes, a Node stream or any async iterable of byte chunks (a web stream, a generator). */
export type BlobSource = Uint8Array | Readable | AsyncIterable<Uint8Array>;

export interface PutOptions {
  /** Refuse (and store nothing) when the content is longer than this many bytes. */
  maxBytes: number;
  contentType?: string;
  /** The key, or a function of the content's SHA-256 (hex) and size that names it once the content is read. */
  key: string | ((content: { sha256: string; size: number }) => string);
}

export interface PutResult {
  key: string;
  /** Bytes stored. */
  size: number;
  /** SHA-256 of the content, lower-case hex, computed while streaming. */
  sha256: string;
}

export interface BlobStat {
  size: number;
  contentType?: string;
}

export interface Storage {
  /** `local` or `s3`, for logs and health pages. */
  readonly kind: 'local' | 's3';
  put(source: BlobSource, options: PutOptions): Promise<PutResult>;
  /** A stream of the object's bytes; throws `BlobNotFoundError` when absent. */
  get(key: string): Promise<Readable>;
  /** The whole object in memory (photos are bounded by the upload limit); throws `BlobNotFoundError`. */
  getBytes(key: string): Promise<Buffer>;
  /** Size (and content type when known), or null when absent. */
  stat(key: string): Promise<BlobStat | null>;
  exists(key: string): Promise<boolean>;
  /** Removes the object; removing an absent key is not an error. */
  delete(key: string): Promise<void>;
}

/** Base of every storage error; `code` is stable for callers mapping errors to responses. */
export class StorageError extends Error {
  constructor(readonly code: 'too-large' | 'not-found' | 'bad-key' | 'write-failed' | 'read-failed', message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'StorageError';
  }
}

export class BlobTooLargeError extends StorageError {
  constructor(readonly maxBytes: number) {
    super('too-large', `The file is larger than the limit of ${formatBytes(maxBytes)}.`);
    this.name = 'BlobTooLargeError';
  }
}

export class BlobNotFoundError extends StorageError {
  constructor(readonly key: string) {
    super('not-found', `No stored file under "${key}".`);
    this.name = 'BlobNotFoundError';
  }
}

const KEY_SEGMENT = /^[A-Za-z0-9._-]+$/;

/** Throws `StorageError('bad-key')` unless `key` is a safe relative path of plain segments. */
export function assertValidKey(key: string): void {
  const parts = key.split('/');
  if (key.length === 0 || key.length > 512 || parts.some((p) => !KEY_SEGMENT.test(p) || p === '.' || p === '..')) {
    throw new StorageError('bad-key', `Invalid storage key "${key.slice(0, 80)}".`);
  }
}

/** "12 MB" style, powers of 1024 written as MB/KB (common practice for upload limits). */
export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${+(n / (1024 * 1024)).toFixed(1)} MB`;
  if (n >= 1024) return `${+(n / 1024).toFixed(1)} KB`;
  return `${n} bytes`;
}
