/**
 * Global setup of the `e2e` project: builds the web app if .next is missing or stale (once for the run),
 * migrates and seeds a fresh SQLite file in a temp folder, starts the production web server (lib/cli/web-server.mjs) on a free port against it and
 * provides `baseUrl` to the tests; the returned teardown stops the server and removes the folder.
 */
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import type { TestProject } from 'vitest/node';
import { migrateDb, openDb } from '@/db/client';
import { ensureBuilt, ROOT, WEB_SERVER } from '@/lib/cli/start';
import { seedDemo } from '@/lib/services/demo';
import { freePort } from '@/tests/free-port';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    dataDir: string;
  }
}


async function waitForServer(url: string, child: { exitCode: number | null }, timeoutMs = 60_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`the web server exited early (${child.exitCode})`);
    try {
      const res = await fetch(url, { redirect: 'manual' });
      if (res.status < 500) return;
    } catch {
      /* not listening yet */
    }
    await delay(250);
  }
  throw new Error(`the app did not answer at ${url} within ${timeoutMs} ms`);
}

export default async function setup(project: TestProject) {
  const t0 = Date.now();
  const buildMs = ensureBuilt(ROOT, (s) => console.log(s));
  const dir = mkdtempSync(join(tmpdir(), 'gridproof-e2e-'));
  const databaseUrl = `file:${join(dir, 'e2e.db')}`;
  const db = await openDb(databaseUrl);
  await migrateDb(db);
  await seedDemo(db);
  db.$client.close();

  const port = await freePort();
  const child = spawn(process.execPath, [WEB_SERVER], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      NEXT_TELEMETRY_DISABLED: '1',
      DATABASE_URL: databaseUrl,
      DEMO_MODE: '1',
      SESSION_SECRET: randomBytes(32).toString('hex'),
      STORAGE_DIR: join(dir, 'storage'),
      APP_URL: `http://localhost:${port}`,
    },
  });
  let log = '';
  child.stdout?.on('data', (b: Buffer) => (log += b.toString()));
  child.stderr?.on('data', (b: Buffer) => (log += b.toString()));
  const baseUrl = `http://localhost:${port}`;
  try {
    await waitForServer(`${baseUrl}/sign-in`, child);
  } catch (err) {
    child.kill('SIGTERM');
    console.error(log);
    throw err;
  }
  console.log(JSON.stringify({ e2eServer: baseUrl, buildMs, readyMs: Date.now() - t0 }));
  project.provide('baseUrl', baseUrl);
  project.provide('dataDir', dir);

  return async () => {
    if (child.exitCode === null) {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      await Promise.race([exited, delay(5000)]);
      if (child.exitCode === null) child.kill('SIGKILL');
    }
    if (process.env.E2E_SHOW_SERVER_LOG) console.log(log);
    rmSync(dir, { recursive: true, force: true });
  };
}
