/**
 * The built app's signed-in pages hydrate without a mismatch, load after load. A mismatch here was intermittent
 * (about one load in twenty): it depended on whether a script chunk had arrived before React reached <head>. So
 * each page is loaded many times in the one browser with routing on (Chromium then keeps no HTTP cache, so every
 * load fetches its chunks afresh, as a first visit does) and its HTML handed over in one piece, which made the
 * mismatch show more often. The pages: members, a bed with a finished check in its history, and that check's
 * report (the measurement core's own report of a synthetic scene, written into the server's database). Any console error or page error naming hydration, or React's hydration error codes
 * (#418 server HTML did not match, #423 recovered by client rendering, #425 text did not match — React's own
 * error list, react.dev/errors), fails the test.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, type LaunchedChromium } from './chromium';
import { Client } from './client';
import { demoLogin, finishedPlateCheck, signInThroughForm } from './session';

const baseUrl = inject('baseUrl');
const LOADS_PER_PAGE = 8;
const HYDRATION_ERROR = /hydrat|#418|#423|#425/i;
let browser: LaunchedChromium | undefined;
let page: Page | undefined;
let checkId = '';
let bedId = '';

beforeAll(async () => {
  const api = new Client(baseUrl);
  const owner = demoLogin('owner');
  expect((await api.req('POST', '/api/auth/sign-in', owner)).status).toBe(200);
  ({ checkId, bedId } = await finishedPlateCheck(api, 'Hydration plate', 7));

  browser = await launchChromium({ width: 1280, height: 900 });
  page = await browser.ctx.newPage();
  await signInThroughForm(page, owner);
  // every document in one piece (and, with routing on, no HTTP cache for the chunks)
  await browser.ctx.route(`${baseUrl}/**`, async (route) => {
    if (route.request().resourceType() !== 'document') return route.continue();
    const res = await route.fetch();
    await route.fulfill({ response: res, body: await res.text() });
  });
});
afterAll(async () => {
  await browser?.close();
});

/** Loads `path` `times` times; returns the hydration errors the console and the page reported. */
async function hydrationErrors(path: string, times: number): Promise<string[]> {
  const p = page!;
  const seen: string[] = [];
  const onConsole = (m: { type(): string; text(): string }) => {
    if (m.type() === 'error' && HYDRATION_ERROR.test(m.text())) seen.push(`${path}: ${m.text().slice(0, 200)}`);
  };
  const onError = (e: Error) => {
    if (HYDRATION_ERROR.test(e.message)) seen.push(`${path}: ${e.message.slice(0, 200)}`);
  };
  p.on('console', onConsole);
  p.on('pageerror', onError);
  try {
    for (let i = 0; i < times; i++) {
      await p.goto(`${baseUrl}${path}`, { waitUntil: 'load' });
      await p.getByTestId('app-header').waitFor();
      // hydration runs once the page's chunks are in; give it a moment after load to report
      await p.waitForTimeout(250);
    }
  } finally {
    p.off('console', onConsole);
    p.off('pageerror', onError);
  }
  return seen;
}

describe('hydration of the signed-in pages', () => {
  it('reports no hydration error over repeated loads of the members page', async () => {
    expect(await hydrationErrors('/members', LOADS_PER_PAGE)).toEqual([]);
  });

  it('reports no hydration error over repeated loads of a bed page with a check in its history', async () => {
    expect(await hydrationErrors(`/beds/${bedId}`, LOADS_PER_PAGE)).toEqual([]);
  });

  it('reports no hydration error over repeated loads of a check report', async () => {
    expect(await hydrationErrors(`/checks/${checkId}`, LOADS_PER_PAGE)).toEqual([]);
  });
});
