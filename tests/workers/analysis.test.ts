/**
 * The main path end to end: a rendered photo (lib/vision/render, exact truth) uploaded through the API →
 * real worker processes → the report. Truth: the renderer's injected panel offsets. The bound is the
 * measurement core's stated panel accuracy (issue: ≤ 0.03 mm on 12 MP scenes at 0.33 mm/px) widened to
 * 0.15 mm for this small, fast 1600 × 1200 px scene (about 0.75 mm/px).
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { POST as uploadPost } from '@/app/api/beds/[id]/checks/route';
import { GET as checkGet } from '@/app/api/checks/[id]/route';
import { GET as reportGet } from '@/app/api/checks/[id]/report/route';
import { checkPositions, photos } from '@/db/schema';
import { jobsForCheck } from '@/db/queries/jobs';
import { ReportSchema, type Pattern } from '@/lib/geometry/contract';
import { createBed } from '@/lib/services/beds';
import type { Actor } from '@/lib/services/actor';
import { synthesize, type Truth } from '@/lib/vision/render';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import { twoPanelDogBed } from '../checks/fixtures';
import { spawnWorker, stopWorker, type WorkerProc } from './spawn';

const PATTERN: Pattern = twoPanelDogBed('two-panel dog bed', { heightMm: 672, originYMm: 48, rows: 7, toleranceMm: 0.5 });

let t: WebTestDb;
let cookie: string;
let bedId: string;
let photo: { jpeg: Buffer; truth: Truth };
const procs: WorkerProc[] = [];

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  const owner: Actor = await newOwner(t.db, 'E2E shop');
  const machinist = await addMember(t.db, owner.workshopId, 'machinist');
  cookie = await sessionCookie(t.db, machinist);
  bedId = (await createBed(t.db, owner, { name: 'Router bed', pattern: PATTERN })).id;
  photo = await synthesize(PATTERN, { seed: 11, panelOffsetMm: 0.6, misplacedCount: 0, supersample: 2 });
});
afterEach(async () => {
  for (const p of procs.splice(0)) await stopWorker(p);
});
afterAll(async () => {
  await t.close();
 
});

const start = (env: Record<string, string>) => {
  const p = spawnWorker({ DATABASE_URL: process.env.DATABASE_URL!, STORAGE_DIR: t.storeDir, ...env });
  procs.push(p);
  return p;
};

async function upload(bytes: Buffer, referenceMm: number) {
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), 'bed.jpg');
  form.append('referenceMm', String(referenceMm));
  const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie, host: 'gridproof.test' }, body: form }),
    { params: Promise.resolve({ id: bedId }) });
  expect(res.status).toBe(202);
  return ((await res.json()) as { check: { id: string } }).check.id;
}

async function waitForEnd(id: string, timeoutMs = 60_000) {
  const t0 = Date.now();
  const seen = new Set<string>();
  for (;;) {
    const r = await call(checkGet, { cookie, params: { id } });
    const c = (r.json as { check: { status: string; stage: string | null; progress: number; error?: string } }).check;
    if (c.stage) seen.add(c.stage);
    if (['done', 'needs-review', 'failed'].includes(c.status)) return { check: c, stages: seen };
    if (Date.now() - t0 > timeoutMs) throw new Error(`check still ${c.status} (${c.stage}); stderr: ${procs.map((p) => p.stderr.join('')).join('').slice(-1500)}`);
    await new Promise((r) => setTimeout(r, 40));
  }
}

describe('a rendered photo through the API and the worker', () => {
  it('becomes a report whose panel offsets match the renderer\'s truth', async () => {
    const w = start({ WORKER_ID: 'e2e', WORKER_LEASE_MS: '5000' });
    await w.waitFor((l) => l.event === 'worker.ready');
    const id = await upload(photo.jpeg, photo.truth.target.sizeMm);
    const { check } = await waitForEnd(id);
    expect(check.error).toBeUndefined();
    expect(['done', 'needs-review']).toContain(check.status);
    // every stage is reported, in order (the worker logs each one as it writes it to the check)
    const stages = [...new Set(w.lines.filter((l) => l.event === 'job.stage' && l.checkId === id).map((l) => l.stage))];
    expect(stages).toEqual(['reading photo', 'finding square', 'finding holes', 'fitting']);
    // the photo-quality verdict is stored before the holes are sought, and the check and the report carry it
    const mine = w.lines.filter((l) => l.checkId === id);
    const qAt = mine.findIndex((l) => l.event === 'job.quality');
    expect(qAt).toBeGreaterThan(-1);
    expect(qAt).toBeLessThan(mine.findIndex((l) => l.event === 'job.stage' && l.stage === 'finding holes'));
    const status = (await call(checkGet, { cookie, params: { id } })).json as { check: { quality?: { issues: unknown[]; predicted: { positionMm: number } | null } } };
    expect(status.check.quality?.predicted?.positionMm).toBeGreaterThan(0);
    const r = await call(reportGet, { cookie, params: { id } });
    expect(r.status).toBe(200);
    const report = ReportSchema.parse(r.json);
    expect(report.photo?.quality).toEqual(status.check.quality);
    const truth = new Map(photo.truth.errors.panels.map((p) => [p.id, p]));
    const L = report.panels.find((p) => p.id === 'L')!;
    const R = report.panels.find((p) => p.id === 'R')!;
    // one photo observes the panels' offsets relative to each other
    expect(Math.abs((R.dx - L.dx) - (truth.get('R')!.dx - truth.get('L')!.dx))).toBeLessThan(0.15);
    expect(Math.abs((R.dy - L.dy) - (truth.get('R')!.dy - truth.get('L')!.dy))).toBeLessThan(0.15);
    await stopWorker(w);
  });

  it('is finished exactly once by a second worker when the first is killed mid-analysis, and one photo stays one photo', async () => {
    const slow = start({ WORKER_ID: 'doomed', WORKER_LEASE_MS: '800', WORKER_TEST_DELAY_MS: '60000' });
    await slow.waitFor((l) => l.event === 'worker.ready');
    const id = await upload(photo.jpeg, photo.truth.target.sizeMm - 1); // same photo, another reference size → a new check
    await slow.waitFor((l) => l.event === 'job.start');
    for (let i = 0; i < 100; i++) {
      const r = await call(checkGet, { cookie, params: { id } });
      if ((r.json as { check: { stage: string | null } }).check.stage === 'reading photo') break;
      await new Promise((res) => setTimeout(res, 20));
    }
    slow.child.kill('SIGKILL');
    await slow.exited;
    const rescuer = start({ WORKER_ID: 'rescuer', WORKER_LEASE_MS: '800' });
    const { check } = await waitForEnd(id);
    expect(['done', 'needs-review']).toContain(check.status);
    const jobs = await jobsForCheck(t.db, id);
    expect(jobs).toHaveLength(1);
    expect(jobs[0]).toMatchObject({ status: 'done', attempts: 2, lockedBy: 'rescuer' });
    const report = ReportSchema.parse((await call(reportGet, { cookie, params: { id } })).json);
    expect(await t.db.select().from(checkPositions).where(eq(checkPositions.checkId, id))).toHaveLength(report.positions.length);
    expect(await t.db.select().from(photos)).toHaveLength(1);
    await stopWorker(rescuer);
  });
});
