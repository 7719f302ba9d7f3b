/**
 * The report, review and comparison in Debian's chromium (playwright-core, no browser download). Two rendered
 * photos of one bed (lib/vision's renderer through `npm run -s synth`: a fresh install with three misplaced
 * inserts and panels off, then the same bed after the panels were reseated) are uploaded through the API and
 * measured by a real worker process. In the browser: the report's table is filtered to the positions out of
 * tolerance (checked against the report JSON), a detection is removed and a missed hole added in review and
 * the check re-fitted (the server's record of who edited is checked), and the two checks are compared from
 * the bed's history. Screenshots of the report at 390 px and 1280 px go to test-results/.
 */
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import type { Page } from 'playwright-core';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { presetById } from '@/lib/geometry';
import type { Report } from '@/lib/geometry/contract';
import { headlineUnderVerdict } from '@/lib/report/headline';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo';
import { Client } from './client';
import { renderPhoto, SHOTS, signInThroughForm, setUpMeasuringBrowser, shootWidths } from './session';

const baseUrl = inject('baseUrl');
const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
const env = setUpMeasuringBrowser('report', { width: 1280, height: 900 });
const api = new Client(baseUrl);

beforeAll(async () => {
  const r = await api.req('POST', '/api/auth/sign-in', { email: owner.email, password: DEMO_PASSWORD });
  expect(r.status).toBe(200);
});

const signIn = (page: Page) => signInThroughForm(page, { email: owner.email, password: DEMO_PASSWORD });

/** Renders a photo of `patternPath`, uploads it with a 150 mm square, waits for the worker, returns the check id. */
async function checkFromPhoto(bedId: string, patternPath: string, name: string, flags: string[]): Promise<string> {
  const photo = renderPhoto(patternPath, join(env.work, name), ['--target-mm', '150', ...flags]);
  expect(statSync(photo).size).toBeGreaterThan(10_000);
  // through the browser's own request context (its session cookie), as the upload page sends it
  const res = await env.ctx.request.post(`${baseUrl}/api/beds/${bedId}/checks`, {
    multipart: { photo: { name: `${name}.jpg`, mimeType: 'image/jpeg', buffer: readFileSync(photo) }, referenceMm: '150', title: name },
  });
  expect(res.status(), await res.text()).toBe(202);
  const id = ((await res.json()) as { check: { id: string } }).check.id;
  await waitSettled(id);
  return id;
}

async function waitSettled(id: string): Promise<string> {
  const until = Date.now() + 90_000;
  for (;;) {
    const s = (await api.req('GET', `/api/checks/${id}`)).json as { check: { status: string; error?: string } };
    if (s.check.status === 'done' || s.check.status === 'needs-review') return s.check.status;
    if (s.check.status === 'failed') throw new Error(`the check failed: ${s.check.error}`);
    if (Date.now() > until) throw new Error(`the check is still ${s.check.status}`);
    await delay(300);
  }
}

describe('report, review and comparison in the browser', () => {
  it('filters the report to positions out, edits a detection and re-fits, and compares two checks', async () => {
    // A 600 × 400 mm bed of M6 inserts on 50 mm in two 200 mm strips (the core's preset).
    const pattern = presetById('m6-50')!.size({ bedWidthMm: 600, bedHeightMm: 400, stripWidthMm: 200 });
    const patternPath = join(env.work, 'pattern.json');
    writeFileSync(patternPath, JSON.stringify(pattern));
    const bed = await api.req('POST', '/api/beds', { name: 'Report test bed', pattern });
    expect(bed.status).toBe(201);
    const bedId = (bed.json as { bed: { id: string } }).bed.id;
    const page = await env.ctx.newPage();
    await signIn(page);
    const before = await checkFromPhoto(bedId, patternPath, 'before', ['--seed', '21', '--misplaced', '4', '--misplaced-mm', '1.2', '--panel-offset', '0.12']);
    const after = await checkFromPhoto(bedId, patternPath, 'after', ['--seed', '22', '--misplaced', '0', '--panel-offset', '0']);
    const report = (await api.req('GET', `/api/checks/${before}/report`)).json as Report;
    expect(report.summary.out).toBeGreaterThan(0);

    // 1. The report: the verdict sentence, then the table filtered to the positions out of tolerance.
    await page.goto(`${baseUrl}/checks/${before}/report`);
    await page.getByTestId('check-report').waitFor();
    expect((await page.getByTestId('verdict-sentence').textContent())!.trim()).toBe(headlineUnderVerdict(report, 'mm'));
    await page.waitForTimeout(500);
    await shootWidths(page, 'report', 1280);
    const rows = page.getByTestId('positions-table').locator('tbody tr');
    expect(await rows.count()).toBe(report.positions.length);
    await page.getByTestId('filter-verdict').selectOption('out');
    await expect.poll(() => rows.count()).toBe(report.summary.out);
    const verdicts = await rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-verdict')));
    expect(new Set(verdicts)).toEqual(new Set(['out']));
    const outLabels = report.positions.filter((p) => p.verdict === 'out').map((p) => p.label).sort();
    expect((await rows.evaluateAll((trs) => trs.map((tr) => tr.querySelector('td')!.textContent))).sort()).toEqual(outLabels);
    // the map marks the same positions with the "out" shape
    expect(await page.locator('svg [data-mark="out"][data-label]').count()).toBe(report.summary.out);

    // the print sheet drops the controls and keeps the figures
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByTestId('filter-verdict').isVisible()).toBe(false);
    expect(await page.getByTestId('verdict-sentence').isVisible()).toBe(true);
    expect(await page.getByTestId('panels-table').isVisible()).toBe(true);
    await page.emulateMedia({ media: 'screen' });

    // 2. Review: remove one detection, add a hole where an expected position was not seen, re-fit.
    await page.goto(`${baseUrl}/checks/${before}/review`);
    await page.getByTestId('review-editor').waitFor();
    // zoom in with the button: the photo's view box narrows (the marks stay on their holes)
    const stage = page.locator('[data-testid="review-editor"] svg[viewBox]').last();
    const vb = async () => Number((await stage.getAttribute('viewBox'))!.split(' ')[2]);
    const fullWidth = await vb();
    await page.getByRole('button', { name: 'Zoom in' }).click();
    await expect.poll(vb).toBeLessThan(fullWidth * 0.7);
    await page.getByRole('button', { name: 'Whole photo' }).click();
    await expect.poll(vb).toBe(fullWidth);
    // two fingers spread apart on the photo (touch pointer events, as a phone sends them; ids no real pointer
    // has, so no capture is taken from the mouse): it zooms in
    await stage.evaluate((el) => {
      const r = el.getBoundingClientRect();
      const cx = r.left + r.width / 2, cy = r.top + r.height / 2;
      const ev = (type: string, id: number, x: number) => el.dispatchEvent(new PointerEvent(type, { pointerId: id, pointerType: 'touch', isPrimary: id === 11, clientX: x, clientY: cy, bubbles: true, cancelable: true }));
      ev('pointerdown', 11, cx - 30); ev('pointerdown', 12, cx + 30);
      for (const d of [50, 80, 110, 140]) { ev('pointermove', 11, cx - d); ev('pointermove', 12, cx + d); }
      ev('pointerup', 11, cx - 140); ev('pointerup', 12, cx + 140);
    });
    await expect.poll(vb).toBeLessThan(fullWidth * 0.5);
    await page.getByRole('button', { name: 'Whole photo' }).click();
    await expect.poll(vb).toBe(fullWidth);
    await shootWidths(page, 'review', 1280);
    await page.getByTestId('mode-remove').click();
    const matched = page.locator('[data-testid="review-editor"] svg g[data-mark]:not([data-mark="unmatched"]):not([data-mark="missing"])');
    await expect.poll(() => matched.count()).toBeGreaterThan(10);
    await matched.nth(5).scrollIntoViewIfNeeded();
    const box = (await matched.nth(5).boundingBox())!;
    await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
    await expect.poll(() => page.getByTestId('edit-summary').textContent()).toContain('1 removed');
    await page.getByTestId('mode-add').click();
    await page.locator('[data-testid="review-editor"] svg image').scrollIntoViewIfNeeded();
    const spot = (await page.locator('[data-testid="review-editor"] svg image').boundingBox())!;
    await page.mouse.click(spot.x + spot.width * 0.5, spot.y + spot.height * 0.03);
    await expect.poll(() => page.getByTestId('edit-summary').textContent()).toContain('1 hole added');
    await page.getByTestId('refit').click();
    await page.waitForURL(`${baseUrl}/checks/${before}/report`, { timeout: 60_000 });
    const detail = (await api.req('GET', `/api/checks/${before}/detail`)).json as { check: { edited: { byName: string; edits: { removedHoles: unknown[]; addedHoles: unknown[] } } | null }; detections: { holes: unknown[] } };
    expect(detail.check.edited?.byName).toBe(owner.name);
    expect(detail.check.edited?.edits.removedHoles).toHaveLength(1);
    expect(detail.check.edited?.edits.addedHoles).toHaveLength(1);
    expect(detail.detections.holes.length).toBe(report.unmatched.length + report.summary.matched);
    await page.getByTestId('check-report').waitFor();

    // 3. History → pick the two checks → the comparison.
    await page.goto(`${baseUrl}/beds/${bedId}/history`);
    await page.getByTestId('bed-history').waitFor();
    await page.locator('.recharts-line').first().waitFor();
    // the trend's lines are drawn in the marks' colours (defined, not empty)
    expect(await page.locator('.recharts-line-curve').first().evaluate((el) => getComputedStyle(el).stroke)).toMatch(/^rgb/);
    await shootWidths(page, 'history', 1280);
    const boxes = page.getByTestId('history-row').locator('input[type="checkbox"]');
    await expect.poll(() => boxes.count()).toBe(2);
    await boxes.nth(0).check();
    await boxes.nth(1).check();
    await page.getByTestId('compare-picked').click();
    await page.waitForURL(`${baseUrl}/compare/${before}/${after}`);
    await page.getByTestId('compare-view').waitFor();
    const cmp = (await api.req('GET', `/api/checks/${before}/compare/${after}`)).json as { comparison: { summary: { sentence: string }; panels: { significant: boolean }[] } };
    expect((await page.getByTestId('compare-sentence').textContent())!.trim()).toBe(cmp.comparison.summary.sentence);
    expect(await page.getByTestId('panel-moves').locator('tbody tr').count()).toBe(cmp.comparison.panels.length);
    await shootWidths(page, 'compare', 1280);
    expect(readFileSync(join(SHOTS, 'report-390.png')).length).toBeGreaterThan(1000);
    expect(readFileSync(join(SHOTS, 'report-1280.png')).length).toBeGreaterThan(1000);
  });
});
