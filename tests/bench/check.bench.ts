/**
 * Upload → report through the real path, printed as JSON (no assertions; see README): rendered photos
 * (lib/vision/render) go through intake (hash + store + check + job) and are measured by real worker
 * processes on one database file.
 * - idle: one worker, photos one after the other → median and worst time from upload to a finished check;
 * - burst: `burst` photos queued at once with two workers → all finished, none twice, wall time.
 * Run: npx tsx tests/bench/check.bench.ts [photos=5] [burst=4] [width=4000] [height=3000] [supersample=2]
 * (the renderer's edge supersampling; 2 keeps rendering the photos quick, it does not touch the timed path)
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { rmSync } from 'node:fs';
import { loadavg } from 'node:os';
import { checks } from '@/db/schema';
import { jobsForCheck } from '@/db/queries/jobs';
import { intakePhoto } from '@/lib/checks/intake';
import { synthesize } from '@/lib/vision/render';
import { BENCH_DOG_BED as pattern, benchShop, benchWorkerEnv, ROOT, waitForCheck } from './worker-setup';

const [photosN = 5, burstN = 4, width = 4000, height = 3000, supersample = 2] = process.argv.slice(2).map(Number);
const bench = await benchShop('check');
const { db, storage, dir } = bench;
const { workshopId, userId, bedId } = bench.shop;

const rendered = [];
for (let i = 0; i < Math.max(photosN, burstN); i++) rendered.push(await synthesize(pattern, { seed: 100 + i, width, height, supersample }));

function startWorker(id: string): Promise<ChildProcess> {
  const p = spawn(process.execPath, ['--import', 'tsx', 'workers/worker.ts'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'], env: benchWorkerEnv(bench, id) });
  return new Promise((resolve, reject) => {
    p.once('exit', (code) => reject(new Error(`worker ${id} exited (${code}) before it was ready`)));
    p.stdout!.setEncoding('utf8').on('data', function ready(d: string) {
      if (d.includes('"worker.ready"')) { p.stdout!.off('data', ready); resolve(p); }
    });
  });
}
const stop = (p: ChildProcess) => new Promise((r) => { p.on('exit', r); p.kill('SIGTERM'); });

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.floor(s.length / 2)]!; };

// idle: one worker, one photo at a time
const w1 = await startWorker('bench-1');
const loadBefore = loadavg().map((x) => +x.toFixed(2));
const idle: number[] = [];
const statuses: string[] = [];
for (let i = 0; i < photosN; i++) {
  const t0 = performance.now();
  const { check } = await intakePhoto(db, storage, { workshopId, bedId, userId, source: rendered[i]!.jpeg, referenceMm: rendered[i]!.truth.target.sizeMm });
  const end = await waitForCheck(db, check.id);
  idle.push(performance.now() - t0);
  statuses.push(end.status);
}

// burst: two workers, all queued at once
const w2 = await startWorker('bench-2');
const t0 = performance.now();
const ids = [];
for (let i = 0; i < burstN; i++) {
  ids.push((await intakePhoto(db, storage, { workshopId, bedId, userId, source: rendered[i]!.jpeg, referenceMm: rendered[i]!.truth.target.sizeMm - 1 })).check.id);
}
const burstStatuses = [];
for (const id of ids) burstStatuses.push((await waitForCheck(db, id)).status);
const burstMs = performance.now() - t0;
const burstJobs = await Promise.all(ids.map((id) => jobsForCheck(db, id)));
await Promise.all([stop(w1), stop(w2)]);

console.log(JSON.stringify({
  bench: 'check',
  // the machine's load (1, 5, 15 min) before the idle runs and at the end: times stretch with other work
  loadAverage: { before: loadBefore, after: loadavg().map((x) => +x.toFixed(2)) },
  photo: { width, height, supersample, megapixels: +(width * height / 1e6).toFixed(1), bytes: median(rendered.map((r) => r.jpeg.length)) },
  idle: { photos: photosN, medianMs: Math.round(median(idle)), worstMs: Math.round(Math.max(...idle)), statuses },
  burst: {
    photos: burstN, workers: 2, wallMs: Math.round(burstMs), statuses: burstStatuses,
    eachJobOnce: burstJobs.every((js) => js.length === 1 && js[0]!.status === 'done' && js[0]!.attempts === 1),
    byWorker: burstJobs.map((js) => js[0]?.lockedBy),
  },
  checks: (await db.select().from(checks)).length,
}));
db.$client.close();
rmSync(dir, { recursive: true, force: true });
