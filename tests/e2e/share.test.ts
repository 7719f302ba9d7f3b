/**
 * A shared report in Debian's chromium (playwright-core, no browser download), opened by someone with no
 * account: the page shows the verdict, the map, the tables and the comments, and neither the page nor any
 * answer the browser receives carries the photo's metadata (its EXIF, written into the uploaded JPEG by
 * sharp, and its file name) or anything else of the workshop (its name, its other bed, its members'
 * addresses, the camera and detector figures of the measurement core's report). The same address answers
 * JSON for Accept: application/json; once revoked or expired, the page and the JSON both answer 410 Gone
 * (RFC 9110 §15.5.11: the resource is no longer available and this is likely permanent); an unknown token is a 404.
 * The check's report is the measurement core's own, of a synthetic photo of the bed, written into the app's
 * database file as the worker would.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import { type BrowserContext } from 'playwright-core';
import { launchChromium, type LaunchedChromium } from './chromium';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { openDb } from '@/db/client';
import { checks, shareLinks } from '@/db/schema';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { headlineUnderVerdict } from '@/lib/report/headline';
import { DEMO_LOGINS, DEMO_PASSWORD, DEMO_WORKSHOP_NAME } from '@/lib/services/demo-accounts';
import { Client } from './client';

const baseUrl = inject('baseUrl');
const dataDir = inject('dataDir');
const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
const PHOTO_NAME = 'IMG_20261202_secret-site.jpg';
const CAMERA_MAKE = 'Zebulon Optics';
const CAMERA_MODEL = 'ZX-4471 serial 0099812';
/** 20 mm dog holes at 96 mm pitch (a common dog-hole grid, common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'shared dog table', units: 'mm', bed: { width: 500, height: 400 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 100, y: 100 }, pitch: { x: 96, y: 96 }, count: { x: 4, y: 3 }, fit: { toleranceMm: 0.5 } }],
};

const api = new Client(baseUrl);
let browser: LaunchedChromium | undefined;
let ctx: BrowserContext;
let checkId: string;
let shareUrl: string;
let linkId: string;
let sentence: string;
/** The sentence as the page shows it under the verdict word (without the word again). */
let shownSentence: string;
let shapeSentence: string | undefined;

beforeAll(async () => {
  expect((await api.req('POST', '/api/auth/sign-in', { email: owner.email, password: DEMO_PASSWORD })).status).toBe(200);
  const bed = await api.req('POST', '/api/beds', { name: 'Shared dog table', pattern: PATTERN });
  expect(bed.status, bed.text).toBe(201);
  const bedId = (bed.json as { bed: { id: string } }).bed.id;
  // a real JPEG carrying EXIF (camera make and model), uploaded under a telling file name
  const jpeg = await sharp({ create: { width: 96, height: 72, channels: 3, background: { r: 120, g: 110, b: 90 } } })
    .withExif({ IFD0: { Make: CAMERA_MAKE, Model: CAMERA_MODEL } }).jpeg().toBuffer();
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), PHOTO_NAME);
  form.append('referenceMm', '150');
  form.append('title', 'Before the glue-up');
  const up = await fetch(`${baseUrl}/api/beds/${bedId}/checks`, { method: 'POST', headers: { cookie: api.cookie }, body: form });
  expect(up.status).toBe(202);
  checkId = ((await up.json()) as { check: { id: string } }).check.id;
  // the workshop really holds the secret: the stored original still carries its EXIF
  const files = (function walk(d: string): string[] { return readdirSync(d).flatMap((n) => (statSync(join(d, n)).isDirectory() ? walk(join(d, n)) : [join(d, n)])); })(join(dataDir, 'storage'));
  expect(files.some((f) => readFileSync(f).includes(CAMERA_MODEL))).toBe(true);
  // the measurement core's report of a synthetic photo of this bed, stored as the worker stores it
  const scene = makeScene({ pattern: PATTERN, seed: 11, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 150, y: 330, angleDeg: 5 } });
  const report = analyzePoints(scene.points, PATTERN);
  sentence = report.summary.sentence;
  shownSentence = headlineUnderVerdict(report, 'mm');
  shapeSentence = report.summary.shapeSentence;
  const db = await openDb(`file:${join(dataDir, 'e2e.db')}`);
  await db.update(checks).set({ status: 'done', progress: 1, reportJson: JSON.stringify(report), verdict: report.summary.verdict, finishedAt: Date.now() }).where(eq(checks.id, checkId));
  db.$client.close();
  expect((await api.req('POST', `/api/checks/${checkId}/comments`, { body: 'dog B2 binds when the table is cold', positionLabel: 'B2' })).status).toBe(201);
  const share = await api.req('POST', `/api/checks/${checkId}/share`, { expiresInDays: 2 });
  expect(share.status, share.text).toBe(201);
  ({ url: shareUrl, id: linkId } = (share.json as { link: { url: string; id: string } }).link);

  browser = await launchChromium({ width: 1280, height: 900 });
  ctx = browser.ctx;
});
afterAll(async () => {
  await browser?.close();
});

const SECRETS = () => [PHOTO_NAME, 'secret-site', CAMERA_MAKE, CAMERA_MODEL, DEMO_WORKSHOP_NAME, 'Main router spoilboard', 'Assembly table', ...DEMO_LOGINS.map((l) => l.email)];
/** Report fields about the camera and the fit that the shared data leaves out: names the app's own code may spell
 *  (the report contract in a script chunk), so they are looked for in the page and the data answers only. */
const PRIVATE_FIELDS = ['focalSource', 'principalPoint', 'diagnostics', 'squareSidePx'];
const isScript = (url: string) => new URL(url).pathname.startsWith('/_next/static/');

describe('a shared report opened without an account', () => {
  it('shows the verdict, map, tables and comments, and leaks nothing of the photo or the workshop', async () => {
    await ctx.clearCookies();
    const page = await ctx.newPage();
    const seen: { url: string; status: number; body: string }[] = [];
    page.on('response', (res) => {
      void res.body().then((b) => seen.push({ url: res.url(), status: res.status(), body: b.toString('latin1') }), () => seen.push({ url: res.url(), status: res.status(), body: '' }));
    });
    const res = await page.goto(shareUrl);
    expect(res?.status()).toBe(200);
    await page.getByTestId('shared-report').waitFor();
    await expect.poll(() => page.getByTestId('verdict-sentence').textContent()).toBe(shownSentence);
    // both verdicts in plain words: the overall size on its own line, hole to hole beside the whole bed in the table
    expect(shapeSentence).toBeTruthy();
    expect(await page.getByTestId('shape-sentence').textContent()).toBe(shapeSentence);
    await page.getByTestId('positions-table').getByText('Hole to hole').first().waitFor();
    await page.getByText('dog B2 binds when the table is cold').waitFor();
    expect(await page.locator('svg[role="img"]').count()).toBeGreaterThan(0);
    await page.waitForLoadState('networkidle');
    const html = await page.content();
    expect(await page.getByTestId('shared-report').textContent()).toContain('Shared dog table');
    for (const s of SECRETS()) {
      expect(html, `page carries "${s}"`).not.toContain(s);
      for (const r of seen) expect(r.body, `${r.url} carries "${s}"`).not.toContain(s);
    }
    for (const s of PRIVATE_FIELDS) {
      expect(html, `page carries "${s}"`).not.toContain(s);
      for (const r of seen.filter((x) => !isScript(x.url))) expect(r.body, `${r.url} carries "${s}"`).not.toContain(s);
    }
    // the browser asked for nothing behind an account: no photo, no check, bed or member data
    for (const r of seen) expect(new URL(r.url).pathname).not.toMatch(/^\/api\/(checks|beds|members|me|accessories)|\/photo/);
    expect(seen.filter((r) => r.url.startsWith(baseUrl)).every((r) => r.status < 400)).toBe(true);
    await page.close();
    // one opening in a browser is one view (the page and the data it loads do not count twice), and a client
    // that fetches the page alone (a chat app's link preview) counts none
    const views = async () => ((await api.req('GET', `/api/checks/${checkId}/share`)).json as { links: { id: string; viewCount: number }[] }).links.find((l) => l.id === linkId)!.viewCount;
    expect(await views()).toBe(1);
    expect((await fetch(shareUrl, { headers: { accept: 'text/html', 'user-agent': 'LinkPreviewBot/1.0' } })).status).toBe(200);
    expect(await views()).toBe(1);
  });

  it('shows the verdict without JavaScript, and says where the map and tables are', async () => {
    const plain = await launchChromium({ width: 412, height: 900 }, { javaScript: false });
    try {
      const page = await plain.ctx.newPage();
      expect((await page.goto(shareUrl))?.status()).toBe(200);
      expect(await page.getByTestId('verdict-sentence').textContent()).toBe(shownSentence);
      expect(await page.getByTestId('shared-report').textContent()).toContain('Shared dog table');
      const pdf = page.getByRole('link', { name: 'download the PDF' });
      expect(await pdf.getAttribute('href')).toBe(`${new URL(shareUrl).pathname.replace(/^\/s\//, '/api/shared/')}/report.pdf`);
    } finally {
      await plain.close();
    }
  });

  it('sends the members\' report API gzipped to a client that takes gzip, and as plain JSON to one that does not', async () => {
    // undici's fetch undoes one Content-Encoding, so a body that decodes to the report was compressed once
    const zipped = await fetch(`${baseUrl}/api/checks/${checkId}/report`, { headers: { cookie: api.cookie, 'accept-encoding': 'gzip' } });
    expect(zipped.status).toBe(200);
    expect(zipped.headers.get('content-encoding')).toBe('gzip');
    expect((JSON.parse(await zipped.text()) as { summary: { sentence: string } }).summary.sentence).toBe(sentence);
    const plain = await fetch(`${baseUrl}/api/checks/${checkId}/report`, { headers: { cookie: api.cookie, 'accept-encoding': 'identity' } });
    expect(plain.headers.get('content-encoding')).toBeNull();
    expect((JSON.parse(await plain.text()) as { summary: { sentence: string } }).summary.sentence).toBe(sentence);
  });

  it('answers the report JSON at the same address for Accept: application/json', async () => {
    const r = await fetch(shareUrl, { headers: { accept: 'application/json' } });
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toContain('application/json');
    expect(r.headers.get('vary') ?? '').toMatch(/accept/i);
    const body = await r.text();
    expect((JSON.parse(body) as { report: { summary: { sentence: string } } }).report.summary.sentence).toBe(sentence);
    for (const s of SECRETS()) expect(body).not.toContain(s);
  });

  it('answers 410 Gone on the page and the JSON once revoked, 404 for a token never made', async () => {
    expect((await api.req('DELETE', `/api/share-links/${linkId}`)).status).toBe(200);
    const page = await ctx.newPage();
    const res = await page.goto(shareUrl);
    expect(res?.status()).toBe(410);
    await page.getByTestId('shared-gone').waitFor();
    expect(await page.getByTestId('shared-report').count()).toBe(0);
    // a token of the right form that no link has: not found
    const unknown = shareUrl.replace(/\/s\/.*$/, `/s/${'A'.repeat(43)}`);
    const res404 = await page.goto(unknown);
    expect(res404?.status()).toBe(404);
    await page.getByTestId('shared-missing').waitFor();
    await page.close();
    expect((await fetch(shareUrl, { headers: { accept: 'application/json' } })).status).toBe(410);
    expect((await fetch(shareUrl)).status).toBe(410);
  });

  it('answers 410 Gone on the page of a link whose time ran out', async () => {
    const made = await api.req('POST', `/api/checks/${checkId}/share`, { expiresInDays: 1 });
    expect(made.status, made.text).toBe(201);
    const { url, id } = (made.json as { link: { url: string; id: string } }).link;
    expect((await fetch(url)).status).toBe(200);
    const db = await openDb(`file:${join(dataDir, 'e2e.db')}`);
    await db.update(shareLinks).set({ expiresAt: Date.now() - 1000 }).where(eq(shareLinks.id, id));
    db.$client.close();
    const res = await fetch(url);
    expect(res.status).toBe(410);
    expect(await res.text()).toContain('This link no longer opens the report');
  });
});
