/**
 * The deviation map on a phone: it keeps a readable width, so at 390 px (a common phone viewport, common practice)
 * it scrolls sideways — and says so above it; at 1280 px it fits and says nothing. The check's report is the
 * measurement core's own report of a synthetic scene, written into the server's database.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, type LaunchedChromium } from './chromium';
import { Client } from './client';
import { demoLogin, finishedPlateCheck, signInThroughForm } from './session';

const baseUrl = inject('baseUrl');
let browser: LaunchedChromium | undefined;
let page: Page;
let checkId = '';

beforeAll(async () => {
  const api = new Client(baseUrl);
  const owner = demoLogin('owner');
  expect((await api.req('POST', '/api/auth/sign-in', owner)).status).toBe(200);
  ({ checkId } = await finishedPlateCheck(api, 'Map width plate', 11));
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
