/**
 * The deviation map on a phone: it keeps a readable width, so at 390 px (a common phone viewport, common practice)
 * it scrolls sideways — and says so above it; at 1280 px it fits and says nothing. The check's report is the
 * measurement core's own report of a synthetic scene, written into the server's database.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { launchChromium, type LaunchedChromium } from './chromium';
import { Client } from './client';
import { checkWithStoredReport, demoLogin, signInThroughForm } from './session';

const baseUrl = inject('baseUrl');
/** M8 inserts at 100 mm pitch (a common insert grid, common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'map width plate', units: 'mm', bed: { width: 800, height: 500 },
  families: [{ id: 'ins', kind: 'threaded-insert', holeDiameter: 12, origin: { x: 100, y: 100 }, pitch: { x: 100, y: 100 }, count: { x: 5, y: 4 }, fit: { fastener: 'M8', clearance: 'medium' } }],
};
let browser: LaunchedChromium | undefined;
let page: Page;
let checkId = '';

beforeAll(async () => {
  const api = new Client(baseUrl);
  const owner = demoLogin('owner');
  expect((await api.req('POST', '/api/auth/sign-in', owner)).status).toBe(200);
  const scene = makeScene({ pattern: PATTERN, seed: 11, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 640, y: 250, angleDeg: 3 } });
  const report = analyzePoints(scene.points, PATTERN);
  checkId = await checkWithStoredReport(api, { name: 'Map width plate', pattern: PATTERN }, { status: 'done', progress: 1, reportJson: JSON.stringify(report), verdict: report.summary.verdict, finishedAt: Date.now() });
  browser = await launchChromium({ width: 390, height: 844 });
  page = await browser.ctx.newPage();
  await signInThroughForm(page, owner);
});
afterAll(async () => {
  await browser?.close();
});

async function mapAt(width: number) {
  await page.setViewportSize({ width, height: width === 390 ? 844 : 900 });
  await page.goto(`${baseUrl}/checks/${checkId}/report`);
  const scroller = page.getByTestId('map-scroller').first();
  await scroller.waitFor();
  const overflowPx = await scroller.evaluate((el) => el.scrollWidth - el.clientWidth);
  return { overflowPx, says: await page.getByTestId('map-scrolls').first().isVisible() };
}

describe('the deviation map on a narrow screen', () => {
  it('scrolls sideways at 390 px and says so above the map', async () => {
    const m = await mapAt(390);
    expect(m.overflowPx).toBeGreaterThan(0);
    expect(m.says).toBe(true);
  });

  it('fits at 1280 px and says nothing about scrolling', async () => {
    const m = await mapAt(1280);
    expect(m.overflowPx).toBe(0);
    expect(m.says).toBe(false);
  });
});
