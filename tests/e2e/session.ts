/**
 * What the browser tests share: signing in through the sign-in form, the demo workshop's logins, for the tests
 * that measure a photo a per-file set-up of a temp folder, the screenshots folder, a real worker process on the e2e
 * server's database and storage, and Chromium, photos rendered by our renderer (`npm run -s synth`); and for the
 * tests that need a finished check but no worker, one whose report is written into the server's database.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq } from 'drizzle-orm';
import type { BrowserContext, Page } from 'playwright-core';
import sharp from 'sharp';
import { afterAll, beforeAll, inject } from 'vitest';
import { openDb } from '@/db/client';
import { checks } from '@/db/schema';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { spawnWorker, stopWorker, type WorkerProc } from '../workers/spawn';
import { launchChromium, type LaunchedChromium } from './chromium';
import type { Client } from './client';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
/** Where the browser tests' screenshots go for review. */
export const SHOTS = join(ROOT, 'test-results');

/** The demo workshop's login for `role`. */
export function demoLogin(role: 'owner' | 'reviewer' | 'machinist'): { email: string; password: string } {
  const login = DEMO_LOGINS.find((l) => l.role === role);
  if (!login) throw new Error(`the demo has no ${role}`);
  return { email: login.email, password: DEMO_PASSWORD };
}

/** Signs in on `page` through the sign-in form and waits for the home page. */
export async function signInThroughForm(page: Page, who: { email: string; password: string }, baseUrl: string = inject('baseUrl')): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(who.email);
  await page.getByLabel('Password').fill(who.password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(`${baseUrl}/`);
}

export interface MeasuringBrowser {
  /** The browser's one context (its cookies are the signed-in session). */
  readonly ctx: BrowserContext;
  /** This file's temp folder (removed after the file). */
  readonly work: string;
  /** A new page signed in as the demo owner (the context's cookies cleared first). */
  ownerPage(): Promise<Page>;
}

/** Makes a 600 × 400 mm bed named `name` from the "M6 inserts on 50 mm" preset through the page's session; returns its id. */
export async function presetBed(page: Page, name: string, baseUrl: string = inject('baseUrl')): Promise<string> {
  const made = await page.request.post(`${baseUrl}/api/beds`, { data: { name, preset: { preset: 'm6-50', bedWidthMm: 600, bedHeightMm: 400 } } });
  if (made.status() !== 201) throw new Error(`the bed was not made (${made.status()}): ${await made.text()}`);
  return ((await made.json()) as { bed: { id: string } }).bed.id;
}

/** Full-page screenshots at phone (390 × 844) and desktop (1280 × 900) size into SHOTS as `<name>-<width>.png`; the page is left at `restoreWidth`. */
export async function shootWidths(page: Page, name: string, restoreWidth: 390 | 1280): Promise<void> {
  const size = (width: number) => ({ width, height: width === 390 ? 844 : 900 });
  await page.evaluate(() => window.scrollTo(0, 0));
  for (const width of [390, 1280]) {
    await page.setViewportSize(size(width));
    await page.waitForTimeout(300);
    await page.screenshot({ path: join(SHOTS, `${name}-${width}.png`), fullPage: true });
  }
  await page.setViewportSize(size(restoreWidth));
}

/**
 * For the file that calls it: a temp folder named with `tag`, the screenshots folder, a worker process on the
 * e2e server's database and storage (so uploads are measured), and Chromium at `viewport` (CSS px); all stopped
 * and removed after the file.
 */
export function setUpMeasuringBrowser(tag: string, viewport: { width: number; height: number }): MeasuringBrowser {
  const dataDir = inject('dataDir');
  let browser: LaunchedChromium | undefined;
  let worker: WorkerProc | undefined;
  let work: string | undefined;
  beforeAll(async () => {
    work = mkdtempSync(join(tmpdir(), `gridproof-${tag}-`));
    mkdirSync(SHOTS, { recursive: true });
    worker = spawnWorker({ DATABASE_URL: `file:${join(dataDir, 'e2e.db')}`, STORAGE_DIR: join(dataDir, 'storage'), WORKER_POLL_MS: '200' });
    browser = await launchChromium(viewport);
  });
  afterAll(async () => {
    await browser?.close();
    if (worker) await stopWorker(worker);
    if (work) rmSync(work, { recursive: true, force: true });
  });
  const ctx = () => {
    if (!browser) throw new Error('the browser is not started yet');
    return browser.ctx;
  };
  return {
    get ctx() {
      return ctx();
    },
    async ownerPage() {
      await ctx().clearCookies();
      const page = await ctx().newPage();
      await signInThroughForm(page, demoLogin('owner'));
      return page;
    },
    get work() {
      if (!work) throw new Error('the temp folder is not made yet');
      return work;
    },
  };
}

/** Renders a photo of the pattern in `patternPath` (JSON) into `outDir` with our renderer and `flags`; returns the photo's path. */
export function renderPhoto(patternPath: string, outDir: string, flags: string[]): string {
  const out = execFileSync('npm', ['run', '-s', 'synth', '--', '--pattern', patternPath, '--out', outDir, ...flags], { cwd: ROOT, encoding: 'utf8' });
  return (JSON.parse(out.trim().split('\n').pop()!) as { photo: string }).photo;
}

/**
 * A check on a new bed of `pattern` made through the API as `api` (signed in), its photo a small grey JPEG that is
 * never measured, and its row then given `fields` (status, report…) in the e2e server's database as the worker
 * would write them. Returns the check's id.
 */
export async function checkWithStoredReport(api: Client, bed: { name: string; pattern: Pattern }, fields: Partial<typeof checks.$inferInsert>): Promise<string> {
  const made = await api.req('POST', '/api/beds', bed);
  if (made.status !== 201) throw new Error(`the bed was not made (${made.status}): ${made.text}`);
  const bedId = (made.json as { bed: { id: string } }).bed.id;
  const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 90, g: 100, b: 110 } } }).jpeg().toBuffer();
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'placeholder.jpg');
  form.append('referenceMm', '150');
  const up = await fetch(`${api.baseUrl}/api/beds/${bedId}/checks`, { method: 'POST', headers: { cookie: api.cookie }, body: form });
  if (up.status !== 202) throw new Error(`the photo was not taken (${up.status}): ${await up.text()}`);
  const checkId = ((await up.json()) as { check: { id: string } }).check.id;
  const db = await openDb(`file:${join(inject('dataDir'), 'e2e.db')}`);
  try {
    await db.update(checks).set(fields).where(eq(checks.id, checkId));
  } finally {
    db.$client.close();
  }
  return checkId;
}

/** M8 inserts at 100 mm pitch, 5 × 4 on an 800 × 500 mm plate (a common insert grid, common practice). */
export const INSERT_PLATE: Pattern = {
  version: 1, name: 'insert plate', units: 'mm', bed: { width: 800, height: 500 },
  families: [{ id: 'ins', kind: 'threaded-insert', holeDiameter: 12, origin: { x: 100, y: 100 }, pitch: { x: 100, y: 100 }, count: { x: 5, y: 4 }, fit: { fastener: 'M8', clearance: 'medium' } }],
};

/**
 * A finished check on a new bed `name` of INSERT_PLATE made as `api` (signed in), its report the measurement core's
 * own of a synthetic scene (`seed`) written into the e2e server's database. Returns the check's and the bed's ids.
 */
export async function finishedPlateCheck(api: Client, name: string, seed: number): Promise<{ checkId: string; bedId: string }> {
  const scene = makeScene({ pattern: INSERT_PLATE, seed, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 640, y: 250, angleDeg: 3 } });
  const report = analyzePoints(scene.points, INSERT_PLATE);
  const checkId = await checkWithStoredReport(api, { name, pattern: INSERT_PLATE }, { status: 'done', progress: 1, reportJson: JSON.stringify(report), verdict: report.summary.verdict, finishedAt: Date.now() });
  const beds = (await api.req('GET', '/api/beds')).json as { beds: { id: string; name: string }[] };
  const bed = beds.beds.find((b) => b.name === name);
  if (!bed) throw new Error(`the bed ${name} is not listed`);
  return { checkId, bedId: bed.id };
}
