/**
 * What the browser tests share: signing in through the sign-in form, the demo workshop's logins, and for the
 * tests that measure a photo a per-file set-up of a temp folder, the screenshots folder, a real worker process on
 * the e2e server's database and storage, and Chromium; photos rendered by our renderer (`npm run -s synth`).
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, inject } from 'vitest';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { spawnWorker, stopWorker, type WorkerProc } from '../workers/spawn';
import { launchChromium, type LaunchedChromium } from './chromium';

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
  return {
    get ctx() {
      if (!browser) throw new Error('the browser is not started yet');
      return browser.ctx;
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
