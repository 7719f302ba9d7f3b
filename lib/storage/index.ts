/**
 * The storage in use, chosen by the environment:
 * - `S3_BUCKET` set → an S3-compatible bucket (`S3_ENDPOINT`, `S3_REGION`, `S3_ACCESS_KEY_ID`,
 *   `S3_SECRET_ACCESS_KEY`, `S3_FORCE_PATH_STYLE=1|true`, `S3_PREFIX`);
 * - otherwise local disk under `STORAGE_DIR` (default `data/storage`, relative to the working directory).
 * `UPLOAD_MAX_BYTES` bounds uploads (default 40 MB).
 */
import { LocalStorage } from './local';
import { S3Storage } from './s3';
import type { Storage } from './types';

export * from './types';
export { LocalStorage } from './local';
export { S3Storage, type S3StorageConfig } from './s3';

export const DEFAULT_UPLOAD_MAX_BYTES = 40 * 1024 * 1024;

/** The upload size limit in bytes from `UPLOAD_MAX_BYTES`, or the default. */
export function uploadMaxBytes(env: Readonly<Record<string, string | undefined>> = process.env): number {
  const v = Number(env.UPLOAD_MAX_BYTES);
  return Number.isInteger(v) && v > 0 ? v : DEFAULT_UPLOAD_MAX_BYTES;
}

/** Builds the storage described by `env` (see the module header). */
export function storageFromEnv(env: Readonly<Record<string, string | undefined>> = process.env): Storage {
  if (env.S3_BUCKET) {
    return new S3Storage({
      bucket: env.S3_BUCKET,
      endpoint: env.S3_ENDPOINT || undefined,
      region: env.S3_REGION || undefined,
      accessKeyId: env.S3_ACCESS_KEY_ID || undefined,
      secretAccessKey: env.S3_SECRET_ACCESS_KEY || undefined,
      forcePathStyle: env.S3_FORCE_PATH_STYLE ? /^(1|true|yes)$/i.test(env.S3_FORCE_PATH_STYLE) : undefined,
      prefix: env.S3_PREFIX || undefined,
    });
  }
  return new LocalStorage(env.STORAGE_DIR || 'data/storage');
}

let shared: Storage | undefined;

/** The process-wide storage, built once from the environment. */
export function getStorage(): Storage {
  shared ??= storageFromEnv();
  return shared;
}
