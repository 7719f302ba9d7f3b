/**
 * Load figures on this machine, printed as one JSON object (no assertions; targets are in issue 7 and the
 * README: ≥ 300 req/s with p99 ≤ 150 ms for the report API on 2 cores).
 *
 * 1. The web app built for production (`next build` when stale, then lib/cli/web-server.mjs, what `npm start`
 *    runs) on a fresh SQLite file with a finished check (the measurement core's report of a 24 × 12 dog-hole bed, 288 positions) and a share
 *    link. autocannon, 50 connections for 20 s each (LOAD_SECONDS to change), against
 *    `GET /api/checks/{id}/report` (signed in), the shared report page `GET /s/{token}` (no account) and the
 *    JSON that page loads in the browser, `GET /api/shared/{token}` (which counts a view each time):
 *    requests/s, median, p99, errors and non-2xx answers.
 * 2. A queue of 20 rendered bed photos (lib/vision/render) with two real worker processes: all finished, none
 *    twice (each job started and finished once across both workers' logs), photos per second.
 * Run: npm run bench:load   (env LOAD_SECONDS, LOAD_CONNECTIONS, LOAD_PHOTOS)
 * The session cookie is sealed here the way lib/auth/session.ts seals it (that module is server-only and
 * pulls in Next's request APIs, so a plain script cannot import it).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import autocannon from 'autocannon';
import { closeDb, getDb, migrateDb } from '@/db/client';
import { checks, jobs } from '@/db/schema';
import { sealData } from 'iron-session';
import { insertSession } from '@/db/queries/sessions';
import { loadSessionSecret } from '@/lib/auth/secret';
import { intakePhoto } from '@/lib/checks/intake';
import type { Pattern } from '@/lib/geometry/contract';
import { ROOT, WEB_SERVER } from '@/lib/cli/start';
import { createShareLink } from '@/lib/services/share';
import { LocalStorage } from '@/lib/storage';
import { synthesize } from '@/lib/vision/render';
import { coreReport, finishedCheck } from '@/tests/services/share-fixtures';
import { newOwner } from '@/tests/web/helpers';
import { freePort } from '@/tests/free-port';

const SECONDS = Number(process.env.LOAD_SECONDS ?? 20);
const CONNECTIONS = Number(process.env.LOAD_CONNECTIONS ?? 50);
const PHOTOS = Number(process.env.LOAD_PHOTOS ?? 20);
const log = (s: string) => process.stderr.write(`[bench:load] ${s}\n`);

const dir = mkdtempSync(join(tmpdir(), 'gridproof-bench-load-'));
process.env.DATABASE_URL = `file:${join(dir, 'load.db')}`;
process.env.SESSION_SECRET = randomBytes(32).toString('hex');
process.env.STORAGE_DIR = join(dir, 'store');
const db = await getDb();
await migrateDb(db);

const BIG: Pattern = {
  version: 1, name: 'load bed 24 × 12', units: 'mm', bed: { width: 2440, height: 1220 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 70, y: 60 }, pitch: { x: 96, y: 96 }, count: { x: 24, y: 12 }, fit: { toleranceMm: 0.3 } }],
  panels: [{ id: 'L', x: 0, y: 0, width: 1220, height: 1220 }, { id: 'R', x: 1220, y: 0, width: 1220, height: 1220 }],
};
const owner = await newOwner(db, 'Load shop');
const done = await finishedCheck(db, owner, BIG, coreReport(BIG));
const share = await createShareLink(db, owner, done.checkId, { expiresInDays: 7 }, 'http://localhost');
const token = share.link.url.split('/').pop()!;
const session = await insertSession(db, { userId: owner.user.id, expiresAt: Date.now() + 24 * 3600_000 });
const cookie = `gp_session=${await sealData({ sid: session.id, wid: owner.workshopId }, { password: loadSessionSecret(), ttl: 30 * 24 * 3600 })}`;


// build in a child whose output goes to stderr, so stdout carries only the JSON
const buildStarted = Date.now();
const built = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '--eval',
  "const m = await import('./lib/cli/start.ts'); m.ensureBuilt(m.ROOT, (s) => console.error(s));"], { cwd: ROOT, stdio: ['ignore', 2, 2] });
if (built.status !== 0) throw new Error('next build failed');
const buildMs = Date.now() - buildStarted;
const port = await freePort();
const base = `http://127.0.0.1:${port}`;
const server: ChildProcess = spawn(process.execPath, [WEB_SERVER], {
  cwd: ROOT,
  env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NODE_ENV: 'production', COOKIE_SECURE: '0', NEXT_TELEMETRY_DISABLED: '1' },
  stdio: ['ignore', 'ignore', 'pipe'],
});
let serverErr = '';
server.stderr!.setEncoding('utf8').on('data', (d: string) => { serverErr += d; });
for (let i = 0; ; i++) {
  try {
    const r = await fetch(`${base}/api/target.pdf`);
    if (r.status < 500) break;
  } catch { /* not up yet */ }
  if (i > 300 || server.exitCode !== null) throw new Error(`the web server did not come up: ${serverErr.slice(-2000)}`);
  await delay(200);
}

async function hammer(path: string, headers: Record<string, string>) {
  // warm-up: compile caches, open connections, fill the report cache
  await autocannon({ url: base + path, connections: 4, duration: 2, headers });
  const r = await autocannon({ url: base + path, connections: CONNECTIONS, duration: SECONDS, headers });
  return {
    path: path.replace(token, '{token}').replace(done.checkId, '{id}'),
    connections: CONNECTIONS,
    seconds: SECONDS,
    requests: r.requests.total,
    requestsPerSecond: Math.round(r.requests.average),
    latencyMs: { median: r.latency.p50, p99: r.latency.p99, max: r.latency.max },
    errors: r.errors + r.timeouts,
    non2xx: r.non2xx,
    bytesPerSecond: Math.round(r.throughput.average),
    // 1-minute load average when the run ended: other work on the machine shares its 2 cores
    loadAverage1m: Math.round(loadavg()[0]! * 100) / 100,
  };
}

log(`report API… (load average ${loadavg().map((x) => x.toFixed(2)).join(' ')})`);
const reportRun = await hammer(`/api/checks/${done.checkId}/report`, { cookie });
// issue 7's target on this 2-core machine, judged here so the JSON says whether this run met it
const TARGET = { requestsPerSecond: 300, p99Ms: 150 };
const reportApi = { ...reportRun, target: TARGET, targetMet: reportRun.errors === 0 && reportRun.non2xx === 0 && reportRun.requestsPerSecond >= TARGET.requestsPerSecond && reportRun.latencyMs.p99 <= TARGET.p99Ms };
// the same with the Accept-Encoding a browser sends: the framework gzips each answer (about 92 → 21 KB), and
// that costs CPU per request; not the target's setting (autocannon's default asks for none), printed beside it
log('report API, gzip accepted…');
const reportApiGzip = await hammer(`/api/checks/${done.checkId}/report`, { cookie, 'accept-encoding': 'gzip, deflate, br' });
log('shared page…');
const sharedPage = await hammer(`/s/${token}`, { accept: 'text/html' });
log('shared report data (what the page loads in the browser)…');
const sharedData = await hammer(`/api/shared/${token}`, { accept: 'application/json' });
server.kill('SIGTERM');

// 2. twenty photos, two workers
log(`rendering ${PHOTOS} photos…`);
const storage = new LocalStorage(process.env.STORAGE_DIR);
const SMALL: Pattern = {
  version: 1, name: 'queue bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
  panels: [{ id: 'L', x: 0, y: 0, width: 480, height: 672 }, { id: 'R', x: 480, y: 0, width: 480, height: 672 }],
};
const { createBed } = await import('@/lib/services/beds');
const bed = await createBed(db, owner, { name: 'Queue bed', pattern: SMALL });
const ids: string[] = [];
for (let i = 0; i < PHOTOS; i++) {
  const p = await synthesize(SMALL, { seed: 100 + i, misplacedCount: 0 });
  const r = await intakePhoto(db, storage, { workshopId: owner.workshopId, bedId: bed.id, userId: owner.user.id, source: p.jpeg, referenceMm: p.truth.target.sizeMm });
  ids.push(r.check.id);
  log(`photo ${i + 1} queued`);
}
type Line = { event: string; jobId?: string; workerId?: string };
const lines: Line[] = [];
const startWorker = (id: string) => {
  const child = spawn(process.execPath, ['--import', 'tsx', 'workers/worker.ts'], {
    // NODE_ENV test: production would also demand SMTP settings for the mail loop, which this bench does not use
    cwd: ROOT, env: { ...process.env, NODE_ENV: 'test', WORKER_ID: id, WORKER_POLL_MS: '50', WORKER_LEASE_MS: '10000' }, stdio: ['ignore', 'pipe', 'inherit'],
  });
  let buf = '';
  child.stdout!.setEncoding('utf8').on('data', (d: string) => {
    buf += d;
    let i;
    while ((i = buf.indexOf('\n')) >= 0) {
      try {
        const line = JSON.parse(buf.slice(0, i)) as Line;
        lines.push(line);
        if (line.event === 'worker.fatal' || line.event === 'job.failed') log(JSON.stringify(line));
      } catch { /* not JSON */ }
      buf = buf.slice(i + 1);
    }
  });
  return child;
};
const t0 = Date.now();
const workers = [startWorker('bench-a'), startWorker('bench-b')];
const terminal = new Set(['done', 'needs-review', 'failed']);
for (;;) {
  const rows = await db.select({ id: checks.id, status: checks.status }).from(checks);
  const mine = rows.filter((r) => ids.includes(r.id));
  if (mine.every((r) => terminal.has(r.status))) break;
  if (Date.now() - t0 > 15 * 60_000) throw new Error('queue did not drain in 15 min');
  if (workers.every((w) => w.exitCode !== null)) throw new Error('both workers exited');
  await delay(100);
}
const elapsedS = (Date.now() - t0) / 1000;
for (const w of workers) w.kill('SIGTERM');
const rows = await db.select().from(checks);
const jobRows = await db.select().from(jobs);
const starts = new Map<string, number>();
for (const l of lines) if (l.event === 'job.start' && l.jobId) starts.set(l.jobId, (starts.get(l.jobId) ?? 0) + 1);
const finishes = lines.filter((l) => l.event === 'job.done' || l.event === 'job.failed');
const byStatus: Record<string, number> = {};
for (const r of rows.filter((x) => ids.includes(x.id))) byStatus[r.status] = (byStatus[r.status] ?? 0) + 1;
const queue = {
  photos: PHOTOS,
  workers: 2,
  checks: byStatus,
  allFinished: ids.every((id) => terminal.has(rows.find((r) => r.id === id)?.status ?? '')),
  noneTwice: [...starts.values()].every((n) => n === 1) && jobRows.every((j) => j.attempts === 1) && finishes.length === PHOTOS,
  perWorker: Object.fromEntries(['bench-a', 'bench-b'].map((w) => [w, finishes.filter((l) => l.workerId === w).length])),
  seconds: Math.round(elapsedS * 10) / 10,
  photosPerSecond: Math.round((PHOTOS / elapsedS) * 100) / 100,
};

process.stdout.write(`${JSON.stringify({ bench: 'load', buildMs, reportApi, reportApiGzip, sharedPage, sharedData, queue, cpus: (await import('node:os')).cpus().length }, null, 2)}\n`);
await closeDb();
rmSync(dir, { recursive: true, force: true });
process.exit(0);
