/**
 * Bad input, end to end: each input of the corpus (tests/fixtures/make-bad-inputs.ts) goes through the real
 * upload route, a real migrated SQLite file, real local storage and a real worker process. Each must end in a
 * clear error to the person (HTTP status + code + message) or a failed check with its reason; the worker must
 * keep running and finish a good photo afterwards; no partial file may stay in storage and no refused input
 * may leave a row. The test prints the table `input | what happened`.
 *
 * Expected outcomes come from the formats' own rules: a file is recognised by its signature, not its name
 * (JPEG T.81, PNG ISO/IEC 15948, HEIF ISO/IEC 23008-12); EXIF orientation per CIPA DC-008 (tag 274);
 * a 16-bit PNG keeps 65 536 levels (ISO/IEC 15948 bit depth 16). Photos of beds are rendered by lib/vision/render
 * with its exact truth; the lattice rules (positive pitch, bounded counts) are the pattern contract's.
 */
import { readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as bedsPost } from '@/app/api/beds/route';
import { POST as uploadPost } from '@/app/api/beds/[id]/checks/route';
import { GET as checkGet } from '@/app/api/checks/[id]/route';
import { POST as refitPost } from '@/app/api/checks/[id]/refit/route';
import { beds, checks, photos } from '@/db/schema';
import type { Pattern } from '@/lib/geometry/contract';
import { createBed } from '@/lib/services/beds';
import { loadPhoto } from '@/lib/vision/load';
import { synthesize } from '@/lib/vision/render';
import { blockRaw, displayedAt, grey16Png, makeBadPhotos, noiseRaw, orientedJpeg } from '@/tests/fixtures/make-bad-inputs';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import { spawnWorker, stopWorker, type WorkerProc } from '@/tests/workers/spawn';

const PATTERN: Pattern = {
  version: 1,
  name: 'hardening dog bed',
  units: 'mm',
  bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
  panels: [{ id: 'L', x: 0, y: 0, width: 480, height: 672 }, { id: 'R', x: 480, y: 0, width: 480, height: 672 }],
};
const UPLOAD_LIMIT = 2_000_000;

let t: WebTestDb;
let cookie: string;
let bedId: string;
let worker: WorkerProc | undefined;
const table: [string, string][] = [];

beforeAll(async () => {
  process.env.UPLOAD_MAX_BYTES = String(UPLOAD_LIMIT);
  t = await useFreshDatabase({ storage: true });
  const owner = await newOwner(t.db, 'Hardening shop');
  const machinist = await addMember(t.db, owner.workshopId, 'machinist');
  cookie = await sessionCookie(t.db, machinist);
  bedId = (await createBed(t.db, owner, { name: 'Bed', pattern: PATTERN })).id;
});
afterAll(async () => {
  if (worker) await stopWorker(worker);
  await t.close();
  delete process.env.UPLOAD_MAX_BYTES;
  console.log(`\ninput | what happened\n--- | ---\n${table.map(([a, b]) => `${a} | ${b}`).join('\n')}\n`);
});

type Answer = { status: number; json: { check?: { id: string }; error?: { code: string; message: string } } };

async function upload(bytes: Buffer, fileName: string, type: string, referenceMm = 150): Promise<Answer> {
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(bytes)], { type }), fileName);
  form.append('referenceMm', String(referenceMm));
  const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie, host: 'gridproof.test' }, body: form }),
    { params: Promise.resolve({ id: bedId }) });
  return { status: res.status, json: (await res.json()) as Answer['json'] };
}

async function waitForEnd(id: string, timeoutMs = 90_000): Promise<{ status: string; error?: string }> {
  const t0 = Date.now();
  for (;;) {
    const r = await call(checkGet, { cookie, params: { id } });
    const c = (r.json as { check: { status: string; error?: string } }).check;
    if (['done', 'needs-review', 'failed'].includes(c.status)) return c;
    if (Date.now() - t0 > timeoutMs) throw new Error(`check still ${c.status}; worker stderr: ${worker?.stderr.join('').slice(-1500)}`);
    await delay(50);
  }
}

const describeAnswer = (a: Answer) => `refused ${a.status} ${a.json.error?.code}: ${a.json.error?.message}`;
const clip = (s: string | undefined, n = 110) => (s && s.length > n ? `${s.slice(0, n)}…` : s ?? '');

/** Files under the storage root, relative, slash-separated. */
function storedFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const name of readdirSync(d)) {
      const p = join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else out.push(relative(t.storeDir, p).split('\\').join('/'));
    }
  };
  walk(dir);
  return out;
}

describe('photos the loader must read right', () => {
  it('turns every one of the eight EXIF orientations upright', async () => {
    const b = blockRaw();
    for (let o = 1; o <= 8; o++) {
      const photo = await loadPhoto(await orientedJpeg(o));
      const centre = displayedAt(o, 0, 0, b.width, b.height);
      expect([photo.width, photo.height, photo.orientation], `orientation ${o}`).toEqual([centre.width, centre.height, o]);
      let worst = 0;
      for (let r = 0; r < 3; r++) {
        for (let c = 0; c < 4; c++) {
          const at = displayedAt(o, c * 16 + 8, r * 16 + 8, b.width, b.height);
          worst = Math.max(worst, Math.abs(photo.grey[at.y * photo.width + at.x]! - b.level(c, r)));
        }
      }
      expect(worst, `orientation ${o}`).toBeLessThan(6); // JPEG q95 on flat blocks
      table.push([`EXIF orientation ${o}`, `read upright as ${photo.width} × ${photo.height} px, block levels within ${worst.toFixed(1)} of the truth`]);
    }
  });

  it('reads a CMYK JPEG through its colour conversion with the tones in order', async () => {
    const b = blockRaw();
    const rgb = await sharp(b.raw, { raw: { width: b.width, height: b.height, channels: 1 } }).toColourspace('srgb').raw().toBuffer();
    const cmyk = await sharp(rgb, { raw: { width: b.width, height: b.height, channels: 3 } }).toColourspace('cmyk').jpeg({ quality: 95 }).toBuffer();
    expect((await sharp(cmyk).metadata()).space).toBe('cmyk');
    const photo = await loadPhoto(cmyk);
    const levels = [];
    for (let r = 0; r < 3; r++) for (let c = 0; c < 4; c++) levels.push(photo.grey[(r * 16 + 8) * photo.width + c * 16 + 8]!);
    for (let i = 1; i < levels.length; i++) expect(levels[i]!).toBeGreaterThan(levels[i - 1]!);
    table.push(['CMYK JPEG', `converted to sRGB and read, ${photo.width} × ${photo.height} px, 12 tone steps kept in order`]);
  });

  it('keeps the precision of a 16-bit PNG', async () => {
    const w = 256;
    const h = 4;
    const png = grey16Png(w, h, (x) => 30000 + x); // 256 levels inside one or two 8-bit steps
    const meta = await sharp(png).metadata();
    const photo = await loadPhoto(png);
    const distinct = new Set(photo.grey.subarray(0, w)).size;
    expect(meta.depth).toBe('ushort');
    expect(photo.bitDepth).toBe(16);
    expect(distinct).toBeGreaterThan(200); // an 8-bit path would leave 1 or 2 levels
    table.push(['16-bit PNG', `read at 16 bit: ${distinct} distinct grey levels in a ramp 256/65535 wide`]);
  });
});

describe('bad input through the API and a worker', () => {
  it('answers each bad upload clearly or fails its check with a reason, keeps the worker running and stores nothing partial', async () => {
    worker = spawnWorker({ DATABASE_URL: process.env.DATABASE_URL!, STORAGE_DIR: t.storeDir, WORKER_ID: 'hardening', WORKER_LEASE_MS: '5000' });
    await worker.waitFor((l) => l.event === 'worker.ready');

    const scene = await synthesize(PATTERN, { seed: 21, misplacedCount: 0 });
    const surface = await sharp(scene.jpeg).extract({ left: 10, top: 10, width: 40, height: 40 }).stats();
    const [r, g, b] = surface.channels.map((c) => Math.round(c.mean));
    const poly = scene.truth.target.cornersPx.map(([x, y]) => `${x},${y}`).join(' ');
    const cover = Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${scene.truth.image.width}" height="${scene.truth.image.height}"><polygon points="${poly}" fill="rgb(${r},${g},${b})" stroke="rgb(${r},${g},${b})" stroke-width="40"/></svg>`);
    const noSquare = await sharp(scene.jpeg).composite([{ input: cover }]).jpeg({ quality: 90 }).toBuffer();
    const discs = Array.from({ length: 40 }, (_, i) => `<circle cx="${(i * 197) % 1200}" cy="${(i * 131) % 900}" r="${10 + (i % 7) * 6}" fill="#${(i % 3) ? '2a2a2a' : '6b4a2f'}"/>`).join('');
    const somethingElse = await sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="900"><rect width="1200" height="900" fill="#9fb8c9"/><path d="M0 600 Q300 450 600 620 T1200 560 V900 H0Z" fill="#5d7a3a"/>${discs}</svg>`)).jpeg().toBuffer();
    const oversize = await sharp(noiseRaw(1800, 1400, 3), { raw: { width: 1800, height: 1400, channels: 3 } }).jpeg({ quality: 100 }).toBuffer();
    expect(oversize.length).toBeGreaterThan(UPLOAD_LIMIT);
    expect(scene.jpeg.length).toBeLessThan(UPLOAD_LIMIT);

    type Row = { input: string; bytes: Buffer; fileName: string; type: string; expect: { refused: [number, string] } | { failed: RegExp } };
    const rows: Row[] = [];
    const corpus = new Map((await makeBadPhotos()).map((p) => [p.input, p]));
    const from = (input: string, e: Row['expect']): Row => {
      const p = corpus.get(input)!;
      return { input, bytes: p.bytes, fileName: p.fileName, type: p.declaredType, expect: e };
    };
    rows.push(from('zero bytes', { refused: [400, 'empty_file'] }));
    rows.push(from('text named .jpg', { refused: [415, 'unsupported_media_type'] }));
    rows.push(from('truncated JPEG (first 40 %)', { failed: /damaged|cut short|could not/i }));
    rows.push(from('PNG named .jpg', { failed: /square/i })); // read as the PNG it is; noise has no square
    rows.push(from('HEIC header', { failed: /HEIC|HEIF/ }));
    rows.push(from('JPEG declaring 30000 × 30000 px', { failed: /megapixel/i }));
    rows.push({ input: `oversize upload (${(oversize.length / 1e6).toFixed(1)} MB, limit ${UPLOAD_LIMIT / 1e6} MB from UPLOAD_MAX_BYTES)`, bytes: oversize, fileName: 'huge.jpg', type: 'image/jpeg', expect: { refused: [413, 'too_large'] } });
    // vision may mistake a chip for a square; the fit then finds too few holes: either way a reason is given
    rows.push({ input: 'bed photo with no reference square', bytes: noSquare, fileName: 'no-square.jpg', type: 'image/jpeg', expect: { failed: /square|holes/i } });
    rows.push({ input: 'photo of something else (a landscape)', bytes: somethingElse, fileName: 'landscape.jpg', type: 'image/jpeg', expect: { failed: /square|holes/i } });

    const accepted: { row: Row; id: string }[] = [];
    for (const row of rows) {
      const a = await upload(row.bytes, row.fileName, row.type);
      if ('refused' in row.expect) {
        expect([a.status, a.json.error?.code], row.input).toEqual(row.expect.refused);
        expect(a.json.error?.message.length, row.input).toBeGreaterThan(10);
        table.push([row.input, describeAnswer(a)]);
      } else {
        expect(a.status, `${row.input}: ${JSON.stringify(a.json)}`).toBe(202);
        accepted.push({ row, id: a.json.check!.id });
      }
    }
    for (const { row, id } of accepted) {
      const end = await waitForEnd(id);
      expect(end.status, row.input).toBe('failed');
      expect(end.error, row.input).toMatch((row.expect as { failed: RegExp }).failed);
      table.push([row.input, `accepted (202), check failed: ${clip(end.error)}`]);
    }

    // the worker is still up and finishes a good photo after all that
    expect(worker.child.exitCode).toBeNull();
    const good = await upload(scene.jpeg, 'good.jpg', 'image/jpeg', scene.truth.target.sizeMm);
    expect(good.status).toBe(202);
    const end = await waitForEnd(good.json.check!.id);
    expect(['done', 'needs-review']).toContain(end.status);
    table.push(['control: rendered bed photo, uploaded last', `check ${end.status}; the worker kept running through every bad input`]);

    // no partial file: every stored file is a photo a row names (no temp parts), and refused inputs left no row
    const rowsNow = await t.db.select().from(photos);
    const files = storedFiles(t.storeDir).filter((f) => !f.startsWith('derived/'));
    expect(files.sort()).toEqual(rowsNow.map((p) => p.storageKey).sort());
    expect(rowsNow).toHaveLength(accepted.length + 1);
    expect(await t.db.select().from(checks)).toHaveLength(accepted.length + 1);
  }, 240_000);

  it('refuses a pattern with a negative pitch or a million holes and saves no bed', async () => {
    const before = (await t.db.select().from(beds)).length;
    const ownerCookie = cookie; // machinists may create beds
    const negative = structuredClone(PATTERN);
    negative.families[0]!.pitch = { x: -96, y: 96 };
    const million = structuredClone(PATTERN);
    million.families[0]!.count = { x: 1000, y: 1000 };
    million.bed = { width: 96_000, height: 96_000 };
    for (const [input, pattern] of [['pattern with a negative pitch', negative], ['pattern with a million holes (1000 × 1000)', million]] as const) {
      const r = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Bad', pattern } });
      const e = (r.json as { error?: { code: string; message: string; fields?: Record<string, string> } }).error;
      expect(r.status, input).toBe(422);
      expect(e?.code).toBe('invalid_input');
      table.push([input, `refused ${r.status} ${e?.code}: ${clip(Object.entries(e?.fields ?? {}).map(([k, v]) => `${k}: ${v}`).join('; ') || e?.message)}`]);
    }
    expect((await t.db.select().from(beds)).length).toBe(before);
  });

  it('refuses review points outside the image and leaves the check as it was', async () => {
    const [done] = (await t.db.select().from(checks)).filter((c) => c.status === 'done' || c.status === 'needs-review');
    expect(done).toBeDefined();
    const detections = JSON.parse(done!.detectionsJson!) as { image: { width: number; height: number }; holes: { x: number; y: number; diameterPx: number }[] };
    const outside = { ...detections, holes: [...detections.holes, { x: detections.image.width + 500, y: -300, diameterPx: 20 }] };
    const r = await call(refitPost, { cookie, params: { id: done!.id }, body: { detections: outside } });
    const e = (r.json as { error?: { code: string; message: string; fields?: Record<string, string> } }).error;
    expect(r.status).toBe(422);
    table.push(['review points outside the image', `refused ${r.status} ${e?.code}: ${clip(Object.values(e?.fields ?? {})[0] ?? e?.message)}`]);
    const [after] = (await t.db.select().from(checks)).filter((c) => c.id === done!.id);
    expect(after?.status).toBe(done!.status);
    expect(after?.detectionsJson).toBe(done!.detectionsJson);
  });
});
