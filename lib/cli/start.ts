/**
 * `npm start`: the whole product on one machine.
 *   1. checks the configuration (SESSION_SECRET, PORT, APP_URL) and stops with a clear message if it is wrong;
 *   2. builds the web app (`next build`) if .next is missing or older than the sources;
 *   3. migrates the database (DATABASE_URL, default file:data/gridproof.db);
 *   4. in demo mode (DEMO_MODE, default 1 here) seeds the demo workshop into an empty database;
 *   5. runs the web server (lib/cli/web-server.mjs: the built app on ${PORT:-3000}, forwarding headers checked)
 *      and the analysis worker (`node --import tsx workers/worker.ts`, if present; it runs each analysis in a
 *      capped analysis process of its own, workers/isolate.ts) side by side, forwarding
 *      SIGINT/SIGTERM to both. A worker that dies is started again after a growing pause while the web server
 *      keeps serving; the web server exiting stops everything.
 * `ensureBuilt()` is also used by the browser tests' global setup.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';

export const ROOT = resolve(fileURLToPath(new URL('../..', import.meta.url)));
const NEXT_BIN = join(ROOT, 'node_modules', 'next', 'dist', 'bin', 'next');
/** The production web server (Next's handler behind Node's HTTP server; see its header). */
export const WEB_SERVER = join(ROOT, 'lib', 'cli', 'web-server.mjs');

/** What the built app depends on; a change in any of these makes .next stale. */
const SOURCES = ['app', 'components', 'lib', 'db', 'public', 'proxy.ts', 'next.config.mjs', 'package.json', 'package-lock.json', 'tsconfig.json'];

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(path)) {
    if (entry === 'node_modules' || entry.startsWith('.')) continue;
    newest = Math.max(newest, newestMtime(join(path, entry)));
  }
  return newest;
}

/** True when .next has no finished build or a source is newer than it. */
export function buildIsStale(root = ROOT): boolean {
  const buildId = join(root, '.next', 'BUILD_ID');
  if (!existsSync(buildId)) return true;
  const built = statSync(buildId).mtimeMs;
  return SOURCES.some((s) => newestMtime(join(root, s)) > built);
}

const sleepMs = (ms: number) => Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);

/** Holds a machine-wide lock (a directory in the temp folder) while `fn` runs, so two builds never overlap. */
function withBuildLock<T>(root: string, fn: () => T): T {
  const lock = join(tmpdir(), `gridproof-build-${createHash('sha256').update(root).digest('hex').slice(0, 12)}.lock`);
  const staleAfterMs = 15 * 60 * 1000;
  for (;;) {
    try {
      mkdirSync(lock);
      break;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      try {
        if (Date.now() - statSync(lock).mtimeMs > staleAfterMs) rmSync(lock, { recursive: true, force: true });
      } catch {
        /* released meanwhile */
      }
      sleepMs(1000);
    }
  }
  try {
    return fn();
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}

/** Runs `next build` when needed (one build at a time); returns how long it took (0 when fresh), ms. */
export function ensureBuilt(root = ROOT, log: (s: string) => void = (s) => console.log(s)): number {
  if (!buildIsStale(root)) return 0;
  return withBuildLock(root, () => {
    if (!buildIsStale(root)) return 0; // someone else built it while we waited
    log('[gridproof] building the web app (next build)…');
    const t0 = Date.now();
    const r = spawnSync(process.execPath, [NEXT_BIN, 'build'], { cwd: root, stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production', NEXT_TELEMETRY_DISABLED: '1' } });
    if (r.status !== 0) throw new Error(`next build failed (exit ${r.status ?? r.signal})`);
    return Date.now() - t0;
  });
}

const EnvSchema = z.object({
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  APP_URL: z.url().optional(),
  DEMO_MODE: z.enum(['0', '1', 'true', 'false']).default('1'),
  TRUST_PROXY_HOPS: z.coerce.number().int().min(0).max(10).optional(),
});

async function main() {
  const parsed = EnvSchema.safeParse({ ...process.env, APP_URL: process.env.APP_URL || undefined, PORT: process.env.PORT || undefined, DEMO_MODE: process.env.DEMO_MODE || undefined, TRUST_PROXY_HOPS: process.env.TRUST_PROXY_HOPS || undefined });
  if (!parsed.success) {
    for (const i of parsed.error.issues) console.error(`[gridproof] ${i.path.join('.')}: ${i.message}`);
    process.exit(2);
  }
  const env = parsed.data;
  process.env.DEMO_MODE = env.DEMO_MODE;
  Object.assign(process.env, { NODE_ENV: 'production' });
  const { loadSessionSecret, isDemoMode } = await import('@/lib/auth/secret');
  try {
    loadSessionSecret();
  } catch (err) {
    console.error(`[gridproof] ${(err as Error).message}`);
    process.exit(2);
  }

  ensureBuilt();

  const { closeDb, getDb, migrateDb } = await import('@/db/client');
  const db = await getDb();
  await migrateDb(db);
  if (isDemoMode()) {
    const { seedDemo } = await import('@/lib/services/demo');
    const r = await seedDemo(db);
    if (r.seeded) console.log('[gridproof] seeded the demo workshop (logins on the sign-in page)');
    if (r.seeded && r.owner && process.env.DEMO_PHOTOS !== '0') {
      // two rendered photos of the demo jig plate, analysed by the worker once it is up
      const { seedDemoChecks } = await import('@/lib/services/demo-checks');
      const { getStorage } = await import('@/lib/storage');
      try {
        const n = await seedDemoChecks(db, getStorage(), r.owner);
        console.log(`[gridproof] queued ${n} demo photos for the worker`);
      } catch (err) {
        console.error('[gridproof] could not queue the demo photos:', err instanceof Error ? err.message : err);
      }
    }
  }
  await closeDb();

  const childEnv = { ...process.env, NEXT_TELEMETRY_DISABLED: '1' };
  const web = spawn(process.execPath, [WEB_SERVER], { cwd: ROOT, stdio: 'inherit', env: { ...childEnv, PORT: String(env.PORT) } });
  const workerFile = join(ROOT, 'workers', 'worker.ts');
  // `node --import tsx` rather than the tsx CLI, so a signal sent to the worker reaches the worker itself
  const startWorkerProcess = () => spawn(process.execPath, ['--import', 'tsx', workerFile], { cwd: ROOT, stdio: 'inherit', env: childEnv });
  let worker: ChildProcess | null = existsSync(workerFile) ? startWorkerProcess() : null;
  if (!worker) console.log('[gridproof] no workers/worker.ts: serving without the analysis worker');
  console.log(`[gridproof] serving on ${env.APP_URL ?? `http://localhost:${env.PORT}`}${isDemoMode() ? ' (demo mode)' : ''}`);

  const alive = (c: ChildProcess | null) => !!c && c.exitCode === null && c.signalCode === null;
  let stopping = false;
  let restartTimer: NodeJS.Timeout | undefined;
  const stopAll = (signal: NodeJS.Signals) => {
    clearTimeout(restartTimer);
    for (const c of [web, worker]) if (c && alive(c)) c.kill(signal);
  };
  for (const sig of ['SIGINT', 'SIGTERM'] as const) {
    process.on(sig, () => {
      stopping = true;
      stopAll(sig);
    });
  }
  await new Promise<void>((done) => {
    const maybeDone = () => { if (!alive(web) && !alive(worker)) done(); };
    // the web server stopping stops everything
    web.on('exit', (code, signal) => {
      if (!stopping) {
        console.error(`[gridproof] web server exited (${code ?? signal}); stopping`);
        stopping = true;
        process.exitCode = code ?? 1;
        stopAll('SIGTERM');
      }
      maybeDone();
    });
    // a worker that dies is started again with a growing pause (1 s, 2 s, … 30 s; back to 1 s after a minute
    // of running), while the web server keeps serving; its jobs are claimed again once their leases run out
    let failures = 0;
    const watch = (c: ChildProcess) => {
      const startedAt = Date.now();
      c.on('exit', (code, signal) => {
        if (stopping) return maybeDone();
        failures = Date.now() - startedAt > 60_000 ? 1 : failures + 1;
        const pauseMs = Math.min(30_000, 1_000 * 2 ** (failures - 1));
        console.error(`[gridproof] worker exited (${code ?? signal}); starting it again in ${pauseMs / 1000} s`);
        restartTimer = setTimeout(() => {
          if (stopping) return;
          worker = startWorkerProcess();
          watch(worker);
        }, pauseMs);
      });
    };
    if (worker) watch(worker);
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((err: unknown) => {
    console.error('[gridproof] start failed:', err);
    process.exit(1);
  });
}
