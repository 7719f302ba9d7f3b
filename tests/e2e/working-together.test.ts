/**
 * The working-together pages in Debian's chromium against the built app: the photo guide with its cautions,
 * the printable target, the accessory library (a preset added from the page), an accessory tried on a finished
 * check (one placement and the map of every placement), a comment on one position under the report, a share link made from the page, and the owner's dev
 * outbox (the demo runs with it) showing the report mail sent to a helper. The check's report is the
 * measurement core's own, of a synthetic photo of the bed, written into the app's database file.
 */
import { type BrowserContext, type Page } from 'playwright-core';
import { launchChromium, type LaunchedChromium } from './chromium';
import { checkWithStoredReport, signInThroughForm } from './session';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { Client } from './client';

const baseUrl = inject('baseUrl');
const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
/** M8 inserts at 100 mm pitch (a common insert grid, common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'fixture plate', units: 'mm', bed: { width: 800, height: 500 },
  families: [{ id: 'ins', kind: 'threaded-insert', holeDiameter: 12, origin: { x: 100, y: 100 }, pitch: { x: 100, y: 100 }, count: { x: 5, y: 4 }, fit: { fastener: 'M8', clearance: 'medium' } }],
};

const api = new Client(baseUrl);
let browser: LaunchedChromium | undefined;
let ctx: BrowserContext;
let page: Page;
let checkId: string;

beforeAll(async () => {
  expect((await api.req('POST', '/api/auth/sign-in', { email: owner.email, password: DEMO_PASSWORD })).status).toBe(200);
  const scene = makeScene({ pattern: PATTERN, seed: 5, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 640, y: 250, angleDeg: 3 } });
  const report = analyzePoints(scene.points, PATTERN);
  checkId = await checkWithStoredReport(api, { name: 'Fixture plate', pattern: PATTERN }, { status: 'done', progress: 1, reportJson: JSON.stringify(report), verdict: report.summary.verdict, finishedAt: Date.now() });

  browser = await launchChromium({ width: 1280, height: 900 });
  ctx = browser.ctx;
  page = await ctx.newPage();
  await signInThroughForm(page, { email: owner.email, password: DEMO_PASSWORD });
});
afterAll(async () => {
  await browser?.close();
});

describe('working together, in the browser', () => {
  it('shows the photo guide with the safety cautions and links the printable target', async () => {
    await page.goto(`${baseUrl}/guide`);
    const text = (await page.locator('main').textContent()) ?? '';
    expect(text).toContain('Machine powered off and the spindle stopped');
    expect(text).toContain('eye and hearing protection');
    expect(text).toContain("machine maker's manual");
    expect(text).toMatch(/wide-angle/);
    await page.getByRole('link', { name: 'Print the reference target' }).click();
    await page.waitForURL(`${baseUrl}/target`);
    const href = await page.getByTestId('target-links').getByRole('link', { name: 'A4 PDF' }).first().getAttribute('href');
    const pdf = await fetch(`${baseUrl}${href}`);
    expect(pdf.status).toBe(200);
    expect(pdf.headers.get('content-type')).toBe('application/pdf');
  });

  it('adds a two-bolt fence from the presets and tries it on the check, then maps where it fits', async () => {
    await page.goto(`${baseUrl}/accessories`);
    await page.getByTestId('preset-select').selectOption('fence-two-bolt');
    await page.getByTestId('preset-add').click();
    await page.getByTestId('accessory-list').getByText('Fence, two bolts', { exact: true }).waitFor();
    await page.goto(`${baseUrl}/checks/${checkId}/fit`);
    await page.getByTestId('fit-at').selectOption('insert A1');
    await page.getByTestId('fit-run').click();
    // 4 steps of 100 mm from A1 along X: the second bolt sits in E1
    await page.getByTestId('fit-result').getByText('insert E1').waitFor();
    expect(await page.getByTestId('fit-result').textContent()).toMatch(/fits, with|binds by/);
    await page.getByTestId('fit-map-run').click();
    const summary = (await page.getByTestId('fit-map-summary').textContent()) ?? '';
    // by hand: with a 4-step span a 5 × 4 grid takes 1 × 4 origins at 0° and 180°, 0 at 90° and 270°
    // (the reference square lies off the lattice, so every hole is seen)
    const [fits, binds] = [...summary.matchAll(/(\d+)/g)].map((m) => Number(m[1]));
    expect(fits! + binds!).toBe(8);
  });

  it('takes a comment on one position under the report', async () => {
    await page.goto(`${baseUrl}/checks/${checkId}/report`);
    const panel = page.getByTestId('comments-panel');
    await panel.getByLabel('Position (optional)').fill('b2');
    await panel.getByLabel('Comment', { exact: true }).fill('insert B2 spins in its hole');
    await panel.getByRole('button', { name: 'Add comment' }).click();
    await panel.getByTestId('comments').getByText('insert B2 spins in its hole').waitFor();
    expect(await panel.getByTestId('comments').textContent()).toContain('insert B2');
  });

  it('makes a share link from the page and shows the report mail to a helper in the dev outbox', async () => {
    await page.goto(`${baseUrl}/checks/${checkId}/share`);
    await page.getByTestId('make-link').click();
    const url = (await page.getByTestId('fresh-link-url').textContent()) ?? '';
    expect(url).toMatch(/\/s\/[A-Za-z0-9_-]{43}$/);
    await page.getByLabel('Their e-mail').fill('helper@e2e.example');
    await page.getByLabel('A short note (optional)').fill('Plate for the next batch');
    await page.getByRole('button', { name: 'Send the report' }).click();
    await page.getByText('Sent to helper@e2e.example').waitFor();
    await page.goto(`${baseUrl}/dev/outbox`);
    await page.getByTestId('outbox').getByText('helper@e2e.example').waitFor();
    await page.getByTestId('outbox').getByRole('link').first().click();
    const link = await page.getByTestId('outbox-link').first().getAttribute('href');
    expect(link).toMatch(/\/s\/[A-Za-z0-9_-]{43}$/);
    expect(await page.getByTestId('outbox-text').textContent()).toContain('Plate for the next batch');
    const anon = await fetch(link!, { headers: { accept: 'application/json' } });
    expect(anon.status).toBe(200);
  });
});
