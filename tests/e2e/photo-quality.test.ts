/**
 * The photo check in Debian's chromium at 390 and 1280 px: the upload page checks a chosen photo at once in the
 * browser (its size from decoding it, its type, its EXIF orientation and focal length, written into the file here
 * with sharp's EXIF writer), and after the upload the check page shows the photo-quality verdict and the accuracy the
 * photo can reach, then the report with a note when the photo had a problem. The photos are rendered by our renderer
 * for the bed's own pattern (`npm run -s synth`); the bad one is the same photo exposed 1.9 times too long
 * (lib/vision/render/degrade.ts: gain in linear light, clipped at white), so its verdict must name over-exposure,
 * and it is still measured. Measured by a real worker process.
 */
import { writeFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { describe, expect, inject, it } from 'vitest';
import { PatternSchema } from '@/lib/geometry/contract';
import { degrade } from '@/lib/vision/render/degrade';
import { presetBed, renderPhoto, SHOTS, setUpMeasuringBrowser } from './session';

const baseUrl = inject('baseUrl');
const env = setUpMeasuringBrowser('quality', { width: 390, height: 844 });

const shot = (page: Page, name: string) => page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true });

/** Uploads the chosen photo with a 150 mm square and follows the check page; the verdict seen, and whether before the report. */
async function uploadAndFollow(page: Page, bedId: string, photo: string, width: number, name: string) {
  await page.goto(`${baseUrl}/beds/${bedId}/upload`);
  await page.getByTestId('photo-input').setInputFiles(photo);
  const pre = page.getByTestId('photo-precheck');
  await expect.poll(() => pre.getAttribute('data-state')).toBe('done');
  await page.getByTestId('reference-units').selectOption('mm');
  await page.getByTestId('reference-size').fill('150');
  await shot(page, `${name}-upload-${width}`);
  const precheck = {
    resolution: (await pre.locator('[data-check="resolution"]').textContent()) ?? '',
    focal: { level: await pre.locator('[data-check="focal"]').getAttribute('data-level'), text: (await pre.locator('[data-check="focal"]').textContent()) ?? '' },
    orientation: await pre.locator('[data-check="orientation"]').getAttribute('data-level'),
    type: (await pre.locator('[data-check="type"]').textContent()) ?? '',
  };
  await page.getByTestId('upload-submit').click();
  await page.waitForURL(/\/checks\/[^/]+$/);
  const verdict = page.getByTestId('photo-quality');
  const settled = page.getByTestId('check-settled');
  let seenBeforeReport = false;
  const until = Date.now() + 90_000;
  while (Date.now() < until) {
    const v = await verdict.first().isVisible().catch(() => false);
    const s = await settled.isVisible().catch(() => false);
    if (v && !s) seenBeforeReport = true;
    if (s || (await page.getByTestId('check-failed').isVisible())) break;
    await page.waitForTimeout(100);
  }
  const failed = (await page.getByTestId('check-failed').isVisible()) ? await page.getByTestId('check-failed').textContent() : null;
  expect(failed, `the check failed: ${failed}`).toBeNull();
  await expect.poll(() => verdict.first().isVisible()).toBe(true);
  await expect.poll(() => settled.isVisible()).toBe(true);
  const issues = (await verdict.first().getAttribute('data-issues')) ?? '';
  const headline = (await page.getByTestId('photo-quality-headline').first().textContent()) ?? '';
  // the report loads after the check settles; its note, if any, sits under the verdict box
  await expect.poll(() => page.getByTestId('check-report').isVisible()).toBe(true);
  await expect.poll(() => page.getByTestId('verdict-sentence').isVisible()).toBe(true);
  const note = (await page.getByTestId('photo-note').isVisible()) ? await page.getByTestId('photo-note').textContent() : null;
  await page.waitForTimeout(300);
  await shot(page, `${name}-check-${width}`);
  return { precheck, issues, headline, note, seenBeforeReport };
}

describe('photo check in the browser', () => {
  it('checks the photo on the upload page, then shows the verdict and the prediction, and a report note for an over-exposed photo', async () => {
    const page = await env.ownerPage();
    // one bed per width: the same photo uploaded again to the same bed is not measured twice (the page links the check)
    const beds = { 390: await presetBed(page, 'Photo check bed, phone'), 1280: await presetBed(page, 'Photo check bed, desktop') };
    const pattern = PatternSchema.parse(((await (await page.request.get(`${baseUrl}/api/beds/${beds[390]}`)).json()) as { pattern: unknown }).pattern);
    writeFileSync(join(env.work, 'pattern.json'), JSON.stringify(pattern));
    const rendered = readFileSync(renderPhoto(join(env.work, 'pattern.json'), env.work, ['--seed', '31', '--target-mm', '150', '--tilt', '3']));
    const { width, height } = await sharp(rendered).metadata();
    // a phone's EXIF: upright, a 26 mm-equivalent lens
    const good = join(env.work, 'good.jpg');
    await sharp(rendered).withExif({ IFD0: { Make: 'Gridproof renderer', Orientation: '1' }, IFD2: { FocalLength: '5.4', FocalLengthIn35mmFilm: '26' } }).jpeg({ quality: 92 }).toFile(good);
    // the same photo exposed 1.9 times too long (no EXIF left, as after an edit)
    const bright = join(env.work, 'bright.jpg');
    writeFileSync(bright, (await degrade(rendered, { gain: 1.9 })).jpeg);

    const results: Record<string, unknown> = {};
    for (const w of [390, 1280] as const) {
      const bedId = beds[w];
      await page.setViewportSize({ width: w, height: w === 390 ? 844 : 900 });
      const g = await uploadAndFollow(page, bedId, good, w, 'photo-quality-good');
      // in the browser: the decoded size, the type, the orientation and the focal length from EXIF
      expect(g.precheck.resolution).toContain(`This photo is ${width} × ${height} px`);
      expect(g.precheck.resolution).toMatch(/positions can be judged to about ± \d/);
      expect(g.precheck.type).toContain('JPEG');
      expect(g.precheck.orientation).toBe('ok');
      expect(g.precheck.focal.level).toBe('ok');
      expect(g.precheck.focal.text).toContain('26 mm equivalent');
      // after the upload: no problem, and what the photo can judge
      expect(g.issues).toBe('');
      expect(g.headline).toMatch(/^This photo can judge positions to ± \d+\.\d+ mm: good for clearances of \d+\.\d+ mm and more\.$/);
      expect(g.note).toBeNull();

      const s = await uploadAndFollow(page, bedId, bright, w, 'photo-quality-bright');
      expect(s.precheck.focal.level).toBe('note');
      expect(s.issues.split(' ')).toContain('overexposed');
      expect(s.headline).toMatch(/can judge positions to ± \d+\.\d+ mm/);
      await expect.poll(() => page.getByTestId('photo-quality').first().textContent()).toMatch(/Switch off the flash/);
      // measured anyway, and the report says plainly that its figures carry the problem
      expect(s.note).toMatch(/over-exposure\. These figures carry it/);
      results[w] = { good: { headline: g.headline, seenBeforeReport: g.seenBeforeReport }, overExposed: { issues: s.issues, headline: s.headline, seenBeforeReport: s.seenBeforeReport } };
    }
    console.log(JSON.stringify({ e2ePhotoQuality: results }));
  });
});
