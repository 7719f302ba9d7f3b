/**
 * `npm start` supervises its worker: the whole product started as `npm start` starts it (the tsx CLI running
 * lib/cli/start.ts, on its own free port, database and storage; the build is the one the e2e setup made).
 * The worker process is killed with SIGKILL, as the kernel's out-of-memory killer would; the web server
 * answers straight away, the worker is started again, and a photo uploaded after the kill is measured within
 * 60 s (the bound). The killed worker's analysis process leaves with it (its IPC channel closes).
 * Processes are found by their command lines under /proc (Linux).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROOT } from '@/lib/cli/start';
import type { Pattern } from '@/lib/geometry/contract';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { synthesize } from '@/lib/vision/render';
import { freePort } from '@/tests/free-port';
import { Client } from './client';

/** 20 mm dog holes on a 96 mm grid (a common dog-hole grid, common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'supervised bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
};
const TSX_CLI = join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs');

let dir: string;
let app: ChildProcess;
let out = '';
let base: string;

/** Every process below `pid` with its command line. */
function descendants(pid: number): { pid: number; cmd: string }[] {
  const found: { pid: number; cmd: string }[] = [];
  const walk = (p: number) => {
    for (const task of readdirSync(`/proc/${p}/task`)) {
      let kids: string[] = [];
      try { kids = readFileSync(`/proc/${p}/task/${task}/children`, 'utf8').trim().split(/\s+/).filter(Boolean); } catch { /* gone */ }
      for (const k of kids.map(Number)) {
        try { found.push({ pid: k, cmd: readFileSync(`/proc/${k}/cmdline`, 'utf8').replace(/\0/g, ' ') }); } catch { continue; }
        walk(k);
      }
    }
  };
  try { walk(pid); } catch { /* the tree is changing */ }
  return found;
}
/** True while `pid` runs (a zombie, dead but not yet reaped, does not count). */
function running(pid: number): boolean {
  try { return !/^\d+ \(.*\) Z/.test(readFileSync(`/proc/${pid}/stat`, 'utf8')); } catch { return false; }
}
const workerPid = () => descendants(app.pid!).find((p) => p.cmd.includes('workers/worker.ts'))?.pid;
const analysisPid = () => descendants(app.pid!).find((p) => p.cmd.includes('workers/analysis-child.ts'))?.pid;

async function until<T>(what: string, f: () => Promise<T | undefined | false> | T | undefined | false, timeoutMs: number): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await f();
    if (v) return v;
    if (Date.now() - t0 > timeoutMs) throw new Error(`${what}: not within ${timeoutMs} ms; output: ${out.slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'gridproof-supervise-'));
  const port = await freePort();
  base = `http://localhost:${port}`;
  app = spawn(process.execPath, [TSX_CLI, 'lib/cli/start.ts'], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env, PORT: String(port), DATABASE_URL: `file:${join(dir, 'app.db')}`, STORAGE_DIR: join(dir, 'storage'),
      SESSION_SECRET: randomBytes(32).toString('hex'), DEMO_MODE: '1', DEMO_PHOTOS: '0', MAIL_DELIVERY: '0', WORKER_POLL_MS: '100', WORKER_LEASE_MS: '3000',
    },
  });
  app.stdout!.on('data', (d: Buffer) => { out = (out + d.toString()).slice(-20_000); });
  app.stderr!.on('data', (d: Buffer) => { out = (out + d.toString()).slice(-20_000); });
  await until('the web server answers', async () => (await fetch(`${base}/sign-in`).catch(() => null))?.status === 200, 120_000);
  await until('the worker is ready', () => out.includes('"worker.ready"'), 120_000);
}, 300_000);

afterAll(async () => {
  if (app && app.exitCode === null) {
    const left = descendants(app.pid!);
    const exited = new Promise((r) => app.once('exit', r));
    app.kill('SIGTERM');
    await Promise.race([exited, new Promise((r) => setTimeout(r, 15_000))]);
    for (const p of left) if (running(p.pid)) process.kill(p.pid, 'SIGKILL');
    if (app.exitCode === null) app.kill('SIGKILL');
  }
  rmSync(dir, { recursive: true, force: true });
});

describe('npm start with its worker killed', () => {
  it('keeps the web server answering and measures a new photo within 60 s', async () => {
    const c = new Client(base);
    const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
    expect((await c.req('POST', '/api/auth/sign-in', { email: owner.email, password: DEMO_PASSWORD })).status).toBe(200);
    const bed = await c.req('POST', '/api/beds', { name: 'Supervised bed', pattern: PATTERN });
    expect(bed.status, bed.text).toBe(201);
    const bedId = (bed.json as { bed: { id: string } }).bed.id;
    const photo = await synthesize(PATTERN, { seed: 31, misplacedCount: 0, supersample: 2 });

    const doomed = await until('the worker process', workerPid, 10_000);
    const doomedAnalysis = await until('its analysis process', analysisPid, 10_000);
    process.kill(doomed, 'SIGKILL');

    // the web server answers at once: a page and an API call while the worker is down
    const page = await fetch(`${base}/sign-in`);
    expect(page.status).toBe(200);
    expect((await c.req('GET', '/api/me')).status).toBe(200);

    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(photo.jpeg)], { type: 'image/jpeg' }), 'after-the-kill.jpg');
    form.append('referenceMm', String(photo.truth.target.sizeMm));
    const up = await fetch(`${base}/api/beds/${bedId}/checks`, { method: 'POST', headers: { cookie: c.cookie }, body: form });
    expect(up.status).toBe(202);
    const checkId = ((await up.json()) as { check: { id: string } }).check.id;

    const uploadedAt = Date.now();
    const check = await until('the photo is measured', async () => {
      const r = await c.req('GET', `/api/checks/${checkId}`);
      const s = (r.json as { check: { status: string; error?: string } }).check;
      return ['done', 'needs-review', 'failed'].includes(s.status) ? s : undefined;
    }, 60_000);
    expect(check.error).toBeUndefined();
    expect(['done', 'needs-review']).toContain(check.status);
    console.log(JSON.stringify({ supervise: { measuredAfterKillMs: Date.now() - uploadedAt } }));

    // a new worker process did it, and the killed one's analysis process is gone
    expect(out).toMatch(/worker exited \(SIGKILL\); starting it again in 1 s/);
    const now = workerPid();
    expect(now).toBeDefined();
    expect(now).not.toBe(doomed);
    await until('the killed worker\'s analysis process leaves', () => !running(doomedAnalysis), 10_000);
    expect((await c.req('GET', `/api/checks/${checkId}/report`)).status).toBe(200);
  });
});
