/**
 * The main path in Debian's chromium (playwright-core, no browser download): the demo owner sets up a bed
 * from a preset sized to the bed, uploads a rendered photo of that bed (lib/vision's renderer through
 * `npm run -s synth`) with the upload throttled so the progress bar is seen moving, and watches the check
 * go through its stages to the report, measured by a real worker process on the e2e server's database.
 * Screenshots at phone (390 px) and desktop (1280 px) width go to test-results/ for review.
 */
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, inject, it } from 'vitest';
import sharp from 'sharp';
import { PatternSchema } from '@/lib/geometry/contract';
import { presetBed, renderPhoto, SHOTS, setUpMeasuringBrowser, shootWidths } from './session';

const baseUrl = inject('baseUrl');
// The worker that measures the upload, on the e2e server's database and storage.
const env = setUpMeasuringBrowser('upload', { width: 390, height: 844 });

describe('bed setup, upload and check status in the browser', () => {
  it('sets up a bed from a preset, uploads a rendered photo and follows the check to its report', async () => {
    const page = await env.ownerPage();

    // 1. A bed from the "M6 inserts on 50 mm" preset, sized to a 600 × 400 mm bed in two 200 mm strips.
    await page.goto(`${baseUrl}/beds/new`);
    await page.getByTestId('preset-select').selectOption('m6-50');
    await page.getByLabel('Sizes in').selectOption('mm');
    await page.getByTestId('preset-width').fill('600');
    await page.getByTestId('preset-height').fill('400');
    await page.getByTestId('preset-strip').fill('200');
    await page.getByTestId('preset-build').click();
    await page.getByTestId('bed-name').fill('Browser test bed');
    const drawing = page.getByTestId('pattern-drawing');
    await expect.poll(() => drawing.locator('circle').count()).toBeGreaterThanOrEqual(12 * 8); // floor((600 − 50)/50) + 1 = 12 by floor((400 − 50)/50) + 1 = 8 inserts
    await expect.poll(() => page.getByTestId('pattern-findings').textContent()).toContain('No mistakes found');

    // Pointing at the drawing names a position; the first insert sits at the front-left, so the bottom-left.
    await drawing.scrollIntoViewIfNeeded();
    const box = (await drawing.boundingBox())!;
    await drawing.hover({ position: { x: box.width * 0.1, y: box.height * 0.88 } });
    await expect.poll(() => page.getByTestId('pattern-pointed').textContent()).toMatch(/insert [A-Z]+\d+ at X/);

    // A mistake shows at once: a 60 mm hole on a 50 mm pitch overlaps its neighbours.
    const diameter = page.getByTestId('family-0-diameter');
    await diameter.fill('60');
    await expect.poll(() => page.getByTestId('pattern-findings').textContent()).toMatch(/overlap their neighbours/);
    expect(await drawing.locator('circle[data-bad="1"]').count()).toBeGreaterThan(0);
    await diameter.fill('6');
    await expect.poll(() => page.getByTestId('pattern-findings').textContent()).toContain('No mistakes found');
    await shootWidths(page, 'bed-setup', 390);

    await page.getByTestId('pattern-save').filter({ visible: true }).click();
    await page.waitForURL((u) => /^\/beds\/[^/]+$/.test(u.pathname) && u.pathname !== "/beds/new");
    const bedId = new URL(page.url()).pathname.split('/').pop()!;

    // 2. A rendered photo of exactly this bed's pattern (from the API), with a 150 mm reference square.
    const bed = await page.request.get(`${baseUrl}/api/beds/${bedId}`);
    expect(bed.status()).toBe(200);
    const pattern = PatternSchema.parse(((await bed.json()) as { pattern: unknown }).pattern);
    expect(pattern.families[0]!.count).toEqual({ x: 12, y: 8 });
    expect(pattern.panels).toHaveLength(2);
    writeFileSync(join(env.work, 'pattern.json'), JSON.stringify(pattern));
    const photo = renderPhoto(join(env.work, 'pattern.json'), env.work, ['--seed', '11', '--target-mm', '150']);
    const photoBytes = statSync(photo).size;

    await page.goto(`${baseUrl}/beds/${bedId}/upload`);
    await page.getByTestId('photo-input').setInputFiles(photo);
    await expect.poll(() => page.getByTestId('photo-preview').isVisible()).toBe(true);
    // The form refuses a square of 0 before sending anything.
    await page.getByTestId('reference-size').fill('0');
    await page.getByTestId('upload-submit').click();
    await expect.poll(() => page.getByRole('alert').first().textContent()).toMatch(/more than 0/);
    await page.getByTestId('reference-units').selectOption('mm');
    await page.getByTestId('reference-size').fill('150');
    // A measured distance along the front row of inserts: 11 pitches of 50 mm, read to ±0.5 mm.
    await page.getByTestId('distances').locator('summary').click();
    await page.getByTestId('distance-0-from').fill('insert A1');
    await page.getByTestId('distance-0-to').fill('insert L1');
    await page.getByTestId('distance-0-length').fill('550');
    await page.getByTestId('distance-0-sigma').fill('0.5');

    // Throttle the upload so the XMLHttpRequest progress events are seen between 0 and 100 %.
    const cdp = await env.ctx.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: Math.max(64 * 1024, photoBytes / 3) });
    await page.getByTestId('upload-submit').click();
    const t0 = Date.now();
    const seen = new Set<number>();
    const bar = page.getByTestId('upload-progress').locator('progress');
    const until = Date.now() + 20_000;
    while (!/\/checks\//.test(page.url()) && Date.now() < until) {
      const v = await bar.getAttribute('value', { timeout: 500 }).catch(() => null);
      if (v !== null) seen.add(Number(v));
      await page.waitForTimeout(100);
    }
    await page.waitForURL(/\/checks\/[^/]+$/);
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    expect([...seen].some((v) => v > 0 && v < 100), `progress values seen: ${[...seen].join(', ')}`).toBe(true);
    const checkId = new URL(page.url()).pathname.split('/').pop()!;
    const uploadMs = Date.now() - t0;

    // 3. The check page follows the job (stages while it runs) until it settles, then shows the report.
    const stages = new Set<string>();
    const settled = page.getByTestId('check-settled');
    const deadline = Date.now() + 75_000;
    while (!(await settled.isVisible()) && Date.now() < deadline) {
      if (await page.getByTestId('check-failed').isVisible()) break;
      const s = await page.getByTestId('check-stage').textContent({ timeout: 300 }).catch(() => null);
      if (s) stages.add(s);
      await page.waitForTimeout(150);
    }
    const failed = await page.getByTestId('check-failed').textContent().catch(() => null);
    expect(failed, `the check failed: ${failed}`).toBeNull();
    await expect.poll(() => settled.isVisible(), { timeout: 10_000 }).toBe(true);
    const settleMs = Date.now() - t0 - uploadMs;
    expect(stages.size, `stages seen: ${[...stages].join(' | ')}`).toBeGreaterThanOrEqual(1);

    const status = await page.request.get(`${baseUrl}/api/checks/${checkId}`);
    const view = ((await status.json()) as { check: { status: string; progress: number } }).check;
    expect(['done', 'needs-review']).toContain(view.status);
    // The report of the measurement core is there once the check has settled.
    const report = await page.request.get(`${baseUrl}/api/checks/${checkId}/report`);
    expect(report.status()).toBe(200);
    // The distance given with the upload went into the fit and is shown with its residual.
    const given = ((await report.json()) as { distances?: { from: string; to: string; mm: number; used: boolean }[] }).distances;
    expect(given).toEqual([expect.objectContaining({ from: 'insert A1', to: 'insert L1', mm: 550, used: true })]);
    await expect.poll(() => page.getByTestId('distances-table').textContent()).toContain('insert L1');
    await page.waitForTimeout(500);
    await shootWidths(page, 'check-report', 390);
    console.log(JSON.stringify({ e2eUpload: { photoBytes, throttledUploadMs: uploadMs, uploadToSettledMs: settleMs, progressSeen: [...seen].sort((a, b) => a - b), stages: [...stages], status: view.status } }));
    // The screenshots were written.
    expect(readFileSync(join(SHOTS, 'check-report-390.png')).length).toBeGreaterThan(1000);

    // 4. Editing the pattern saves a new revision (PATCH /api/beds/{id}); the check keeps its own.
    await page.goto(`${baseUrl}/beds/${bedId}/setup`);
    await page.getByTestId('pattern-units').selectOption('in');
    await expect.poll(() => page.getByTestId('family-0-pitch-x').inputValue()).toBe(String(Math.round((50 / 25.4) * 1e9) / 1e9));
    await page.getByTestId('pattern-save').filter({ visible: true }).click();
    await page.waitForURL((u) => u.pathname === `/beds/${bedId}`);
    const after = (await (await page.request.get(`${baseUrl}/api/beds/${bedId}`)).json()) as { pattern: { units: string }; revisions: unknown[] };
    expect(after.pattern.units).toBe('in');
    expect(after.revisions).toHaveLength(2);
    expect((await page.request.get(`${baseUrl}/api/checks/${checkId}/report`)).status()).toBe(200);
  });

  it('says why a photo could not be measured and offers another photo or marking the corners', async () => {
    const page = await env.ownerPage();
    const bedId = await presetBed(page, 'Bare bed');
    // A photo of nothing: an even grey frame, no reference square and no holes in it.
    const blank = join(env.work, 'blank.jpg');
    await sharp({ create: { width: 1200, height: 900, channels: 3, background: { r: 128, g: 124, b: 118 } } }).jpeg({ quality: 85 }).toFile(blank);

    await page.goto(`${baseUrl}/beds/${bedId}/upload`);
    await page.getByTestId('photo-input').setInputFiles(blank);
    await page.getByTestId('reference-units').selectOption('mm');
    await page.getByTestId('reference-size').fill('150');
    await page.getByTestId('upload-submit').click();
    await page.waitForURL(/\/checks\/[^/]+$/);
    const failed = page.getByTestId('check-failed');
    await expect.poll(() => failed.isVisible(), { timeout: 60_000, interval: 300 }).toBe(true);
    const text = (await failed.textContent()) ?? '';
    expect(text).toContain('What to try');
    expect(await failed.getByRole('link', { name: 'Upload another photo' }).getAttribute('href')).toBe(`/beds/${bedId}/upload`);
    const checkId = new URL(page.url()).pathname.split('/').pop()!;
    // The API says the same, with the reason the page shows.
    const view = ((await (await page.request.get(`${baseUrl}/api/checks/${checkId}`)).json()) as { check: { status: string; error?: string } }).check;
    expect(view.status).toBe('failed');
    expect(view.error && text.includes(view.error)).toBe(true);
    await shootWidths(page, 'check-failed', 390);
  });
});
