/**
 * Peak memory of the worker per 12 MP analysis, printed as JSON (no assertions; see README): one real worker
 * process (NODE_ENV=production, as `npm start` runs it) on a fresh database file measures `photos` rendered
 * photos (lib/vision/render) one after the other. Each analysis step logs `job.analysis` with the peak
 * resident memory (max RSS) of the analysis process and of the worker process itself; the figures below are
 * those of the last step of each job. The analysis process is started once and reused, so its peak after
 * the first job shows whether reuse makes it grow.
 * Run: npx tsx tests/bench/worker.bench.ts [photos=3] [width=4000] [height=3000] [supersample=2]
 */
import { spawn } from 'node:child_process';
import { rmSync } from 'node:fs';
import { loadavg } from 'node:os';
import { setTimeout as delay } from 'node:timers/promises';
import { intakePhoto } from '@/lib/checks/intake';
import { synthesize } from '@/lib/vision/render';
import { BENCH_DOG_BED as pattern, benchShop, benchWorkerEnv, ROOT, waitForCheck } from './worker-setup';

const [photosN = 3, width = 4000, height = 3000, supersample = 2] = process.argv.slice(2).map(Number);
const bench = await benchShop('worker');
const { db, storage, dir, shop } = bench;
const rendered = [];
for (let i = 0; i < photosN; i++) rendered.push(await synthesize(pattern, { seed: 200 + i, width, height, supersample }));

interface Line { event: string; checkId?: string; jobId?: string; step?: string; ms?: number; childPeakMb?: number; parentPeakMb?: number }
const lines: Line[] = [];
const memoryMb = Number(process.env.WORKER_JOB_MEMORY_MB || 1536);
const worker = spawn(process.execPath, ['--import', 'tsx', 'workers/worker.ts'], {
  cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'], env: benchWorkerEnv(bench, 'bench-memory', { WORKER_JOB_MEMORY_MB: String(memoryMb) }),
});
let buf = '';
worker.stdout!.setEncoding('utf8').on('data', (d: string) => {
  buf += d;
  for (let i = buf.indexOf('\n'); i >= 0; i = buf.indexOf('\n')) {
    try { lines.push(JSON.parse(buf.slice(0, i)) as Line); } catch { /* not a log line */ }
    buf = buf.slice(i + 1);
  }
});
const until = async (pred: () => boolean) => { while (!pred()) await delay(20); };
await until(() => lines.some((l) => l.event === 'worker.ready'));

const jobs = [];
for (const r of rendered) {
  const { check, job } = await intakePhoto(db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: r.jpeg, referenceMm: r.truth.target.sizeMm });
  const end = await waitForCheck(db, check.id, 20);
  const steps = lines.filter((l) => l.event === 'job.analysis' && l.jobId === job?.id);
  const last = steps[steps.length - 1];
  jobs.push({
    status: end.status,
    analysisMs: steps.reduce((s, l) => s + (l.ms ?? 0), 0),
    childPeakMb: last?.childPeakMb, parentPeakMb: last?.parentPeakMb,
  });
}
await new Promise((r) => { worker.on('exit', r); worker.kill('SIGTERM'); });

const max = (xs: (number | undefined)[]) => Math.max(...xs.map((x) => x ?? 0));
console.log(JSON.stringify({
  bench: 'worker-memory',
  loadAverage: loadavg().map((x) => +x.toFixed(2)),
  photo: { width, height, supersample, megapixels: +(width * height / 1e6).toFixed(1), bytes: rendered[0]!.jpeg.length },
  capMb: memoryMb,
  jobs,
  // peak resident memory (max RSS) over the run: the analysis process (its whole life: start, opencv-wasm, every
  // job) and the worker process (queue, database, the photo's bytes; it no longer loads opencv-wasm)
  peakMb: { analysisProcess: max(jobs.map((j) => j.childPeakMb)), workerProcess: max(jobs.map((j) => j.parentPeakMb)), sum: max(jobs.map((j) => j.childPeakMb)) + max(jobs.map((j) => j.parentPeakMb)) },
  firstJobChildPeakMb: jobs[0]?.childPeakMb,
}));
db.$client.close();
rmSync(dir, { recursive: true, force: true });
