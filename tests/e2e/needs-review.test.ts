/**
 * A check the worker could not trust in the browser: the report page says so above the report, with the
 * worker's own reason, and offers review to those who may re-fit (owner, machinist) but not to a reviewer,
 * who still sees the warning. The report is the measurement core's, on a synthetic photo of which only a
 * third of the holes were detected (as after a bad exposure), and the reason is lib/checks/review.ts's, stored
 * as the worker stores it.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { needsReview } from '@/lib/checks/review';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { launchChromium, type LaunchedChromium } from './chromium';
import { checkWithStoredReport, signInThroughForm } from './session';
import { Client } from './client';

const baseUrl = inject('baseUrl');
/** 20 mm dog holes at 96 mm pitch (common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'review dog table', units: 'mm', bed: { width: 1000, height: 620 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 62, y: 58 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 6 }, fit: { toleranceMm: 0.5 } }],
};

let browser: LaunchedChromium | undefined;
let checkId: string;
let reason: string;

beforeAll(async () => {
  const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
  const api = new Client(baseUrl);
  expect((await api.req('POST', '/api/auth/sign-in', { email: owner.email, password: DEMO_PASSWORD })).status).toBe(200);
  const scene = makeScene({ pattern: PATTERN, seed: 21, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 430, y: 250, angleDeg: 4 } });
  const points = { ...scene.points, holes: scene.points.holes.filter((_, i) => i % 3 === 0) };
  const report = analyzePoints(points, PATTERN);
  reason = needsReview(report)!;
  expect(reason).toMatch(/^Only \d+ of \d+ positions were matched/);
  checkId = await checkWithStoredReport(api, { name: 'Review dog table', pattern: PATTERN }, {
    status: 'needs-review', stage: reason, progress: 1, reportJson: JSON.stringify(report), detectionsJson: JSON.stringify(points),
    verdict: report.summary.verdict, finishedAt: Date.now(),
  });
  browser = await launchChromium({ width: 1280, height: 900 });
});
afterAll(async () => {
  await browser?.close();
});

async function signedIn(role: 'owner' | 'reviewer'): Promise<Page> {
  await browser!.ctx.clearCookies();
  const page = await browser!.ctx.newPage();
  const who = DEMO_LOGINS.find((l) => l.role === role)!;
  await signInThroughForm(page, { email: who.email, password: DEMO_PASSWORD });
  return page;
}

describe('a check that needs review', () => {
  it('warns above the report with the worker\'s reason and offers the owner the review', async () => {
    const page = await signedIn('owner');
    await page.goto(`${baseUrl}/checks/${checkId}`);
    const settled = page.getByTestId('check-settled');
    await settled.waitFor();
    expect(await settled.getAttribute('data-status')).toBe('needs-review');
    const banner = settled.getByRole('status').filter({ hasText: 'Look at this one before you trust it.' });
    await banner.waitFor();
    expect(await banner.textContent()).toContain(reason);
    const review = banner.getByRole('link', { name: 'Review the detections' });
    expect(await review.getAttribute('href')).toBe(`/checks/${checkId}/review`);
    // the report's own colours follow the theme too: the map's ground is paper-light, then slate-dark
    const map = page.locator('svg[role="img"][viewBox]').first();
    await map.waitFor();
    const ground = () => map.evaluate((el) => getComputedStyle(el).backgroundColor);
    await page.emulateMedia({ colorScheme: 'light' });
    expect(await ground()).toBe('rgb(251, 250, 245)');
    await page.emulateMedia({ colorScheme: 'dark' });
    expect(await ground()).toBe('rgb(22, 25, 28)');
    await page.emulateMedia({ colorScheme: 'light' });
    await page.close();
  });

  it('warns a reviewer too, without offering a re-fit they may not run', async () => {
    const page = await signedIn('reviewer');
    await page.goto(`${baseUrl}/checks/${checkId}`);
    const banner = page.getByTestId('check-settled').getByRole('status').filter({ hasText: 'Look at this one before you trust it.' });
    await banner.waitFor();
    expect(await banner.textContent()).toContain(reason);
    expect(await banner.getByRole('link', { name: 'Review the detections' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Review and re-fit' }).count()).toBe(0);
    await page.close();
  });
});
