/** Starts a local fake S3 server (s3rver, from the npm registry) on a free loopback port, for tests. */
import { createRequire } from 'node:module';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { AddressInfo } from 'node:net';

interface S3rverInstance { run(): Promise<AddressInfo>; close(): Promise<void> }
type S3rverCtor = new (options: {
  address: string; port: number; silent: boolean; directory: string; configureBuckets: { name: string }[];
}) => S3rverInstance;

export interface FakeS3 {
  endpoint: string;
  bucket: string;
  /** Environment for `storageFromEnv` / child processes. */
  env: Record<string, string>;
  stop: () => Promise<void>;
}

export async function startFakeS3(bucket = 'gridproof-test'): Promise<FakeS3> {
  const S3rver = createRequire(import.meta.url)('s3rver') as S3rverCtor;
  const directory = mkdtempSync(join(tmpdir(), 'gridproof-s3rver-'));
  const server = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory, configureBuckets: [{ name: bucket }] });
  const { port } = await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  return {
    endpoint,
    bucket,
    env: {
      S3_BUCKET: bucket, S3_ENDPOINT: endpoint, S3_REGION: 'us-east-1', S3_ACCESS_KEY_ID: 'S3RVER',
      S3_SECRET_ACCESS_KEY: 'S3RVER', S3_FORCE_PATH_STYLE: 'true',
    },
    stop: async () => { await server.close(); rmSync(directory, { recursive: true, force: true }); },
  };
}
