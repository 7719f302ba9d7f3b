/**
 * Photo-quality benchmark (`npm run bench:vision`, or alone with `npm run bench:vision -- --part quality`); prints JSON.
 * - Time of the quality stage on a 12 MP (4000 × 3000) rendered photo of the large bed: its own time (timeMs, after
 *   the decode and the square it shares with the analysis) and bytes → verdict (checkPhotoQuality), median of 5.
 * - Hits and false alarms per issue code over photos made bad on purpose by our renderer and its degradations
 *   (lib/vision/render/degrade.ts): the truth of each photo is the degradation applied, not an output of the stage.
 *   A hit is an expected code given; a false alarm a code given that the photo does not have. Sizes are taken from
 *   the renderer's true target corners: a photo whose target truly spans under 200 px, or whose holes under 10 px
 *   (a resize, a steep tilt), expects target-small or holes-small as well.
 * - Predicted against measured accuracy over seeded photos analysed through the whole pipeline (analyzeImage):
 *   position 1σ against the RMS distance of measured positions from the renderer's truth after the best similarity
 *   (the contract's "global scale set apart"), scale 1σ per axis against the report's scale X and Y errors from the
 *   truth. Ratio = RMS predicted ÷ RMS measured (pooled), and per photo for positions.
 * Bed mm, image px.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { PatternSchema, PHOTO_ISSUE_CODES, type Pattern, type PhotoIssueCode, type PhotoQuality } from '@/lib/geometry/contract';
import { analyzeImage, checkPhotoQuality } from '@/lib/vision';
import { synthesize, type SceneOptions, type Truth } from '@/lib/vision/render';
import { degrade, type Degradation } from '@/lib/vision/render/degrade';
import { loadPhoto, reduce } from '@/lib/vision/load';
import { LIMITS, measureQuality } from '@/lib/vision/quality';
import { findSquare } from '@/lib/vision/square';
import { cutThroughTarget } from '../vision/scenes';
import { positionErrorAfterSimilarityMm, scoreDetections } from '../vision/score';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const load = (f: string): Pattern => PatternSchema.parse(JSON.parse(readFileSync(path.join(ROOT, 'tests/fixtures/vision', f), 'utf8')));
const SMALL = load('bed-small.json');
const LARGE = load('bed-large.json');
const SMALL_BASE: Partial<SceneOptions> = { width: 1200, height: 900, supersample: 3 };
/** M6 bores (6 mm) at 100 mm on a 1200 × 900 mm bed: about 8 px across in a 1600 × 1200 photo. */
const M6: Pattern = PatternSchema.parse({
  version: 1, name: 'M6 at 100 mm', units: 'mm', bed: { width: 1200, height: 900 },
  families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter: 6, origin: { x: 50, y: 50 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 9 }, fit: { fastener: 'M6', clearance: 'medium' } }],
});

const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); return s.length ? s[Math.floor(s.length / 2)]! : NaN; };
const rms = (v: number[]) => Math.sqrt(v.reduce((a, x) => a + x * x, 0) / v.length);
const r = (x: number, k = 1000) => Math.round(x * k) / k;

/** The 12 MP photo, rendered once and kept in the temp folder. */
async function twelveMp(): Promise<{ jpeg: Buffer; truth: Truth }> {
  const dir = path.join(os.tmpdir(), 'gridproof-bench-quality-v1');
  mkdirSync(dir, { recursive: true });
  const f = path.join(dir, 'large-12mp.jpg');
  const t = path.join(dir, 'large-12mp.json');
  if (existsSync(f) && existsSync(t)) return { jpeg: readFileSync(f), truth: JSON.parse(readFileSync(t, 'utf8')) as Truth };
  const s = await synthesize(LARGE, { seed: 21, width: 4000, height: 3000, tiltDeg: 4, supersample: 2 });
  writeFileSync(f, s.jpeg);
  writeFileSync(t, JSON.stringify(s.truth));
  return s;
}

async function timing(photo: { jpeg: Buffer; truth: Truth }) {
  // the stage alone on the decoded photo and its square (what the analysis hands it), wall and CPU time of this
  // process (the stage runs on one thread: its CPU time is its time on an idle core, whatever else loads the machine)
  const img = await loadPhoto(photo.jpeg);
  const factor = Math.max(1, Math.ceil(Math.max(img.width, img.height) / 1500));
  const small = reduce(img.grey, img.width, img.height, factor);
  const sq = await findSquare(img.grey, img.width, img.height, small, factor);
  if (!sq) throw new Error('no square in the 12 MP photo');
  const input = { grey: img.grey, width: img.width, height: img.height, small, factor, corners: sq.corners, referenceMm: photo.truth.target.sizeMm, pattern: LARGE, cornerSigmaPx: sq.cornerSigmaPx };
  const wall: number[] = [];
  const cpu: number[] = [];
  let q: PhotoQuality | undefined;
  for (let i = 0; i < 6; i++) {
    const t = performance.now();
    const c = process.cpuUsage();
    q = await measureQuality(input);
    const u = process.cpuUsage(c);
    if (i === 0) continue; // the first run loads opencv-wasm
    wall.push(performance.now() - t);
    cpu.push((u.user + u.system) / 1000);
  }
  const whole: number[] = [];
  for (let i = 0; i < 3; i++) {
    const t = performance.now();
    await checkPhotoQuality(photo.jpeg, LARGE, { referenceMm: photo.truth.target.sizeMm });
    whole.push(performance.now() - t);
  }
  return {
    photo: '4000 × 3000, large bed', targetMs: 300, stageMedianMs: r(median(wall), 10), stageMedianCpuMs: r(median(cpu), 10), stageMaxMs: r(Math.max(...wall), 10),
    bytesToVerdictMedianMs: Math.round(median(whole)), holesSampled: q!.measured.holesSampled, issues: q!.issues.map((i) => i.code), loadAverage: os.loadavg().map((x) => +x.toFixed(2)),
  };
}

interface Case {
  name: string;
  pattern: Pattern;
  options: Partial<SceneOptions>;
  degrade?: Degradation | ((t: Truth) => Degradation);
  expect: PhotoIssueCode[];
  /** A ready photo instead of a render (the 12 MP one, downscaled). */
  photo?: { jpeg: Buffer; truth: Truth };
}

/** The frame cut to its 70 % nearest the target: the far part of the bed is outside, the target whole. */
function cutAwayFromTarget(t: Truth): Degradation {
  const cx = t.target.cornersPx.reduce((a, c) => a + c[0] / 4, 0);
  const w = Math.round(0.7 * t.image.width);
  return { crop: { x: cx > t.image.width / 2 ? t.image.width - w : 0, y: 0, width: w, height: t.image.height } };
}

function cases(big: { jpeg: Buffer; truth: Truth }): Case[] {
  const c: Case[] = [];
  const S = (name: string, options: Partial<SceneOptions>, expect: PhotoIssueCode[], deg?: Case['degrade']) => c.push({ name, pattern: SMALL, options: { ...SMALL_BASE, ...options }, expect, ...(deg ? { degrade: deg } : {}) });
  // good photos across the renderer's ranges
  S('good: straight down', { seed: 701, tiltDeg: 0, blurPx: 0.5 }, []);
  S('good: 8° tilt, plywood', { seed: 702, tiltDeg: 8, material: 'plywood' }, []);
  S('good: defocus 1.2 px, JPEG 80', { seed: 703, blurPx: 1.2, jpegQuality: 80 }, []);
  S('good: strong light gradient', { seed: 704, lightGradient: 0.4, vignetting: 0.4 }, []);
  S('good: 15° tilt, barrel lens', { seed: 705, tiltDeg: 15, k1: -0.06 }, []);
  S('good: phone camera', { seed: 706, camera: 'phone', tiltDeg: 5 }, []);
  for (const [i, s] of [2, 3, 4].entries()) S(`defocus σ ${s} px`, { seed: 711 + i, blurPx: s, tiltDeg: 3 + 2 * i }, ['blurred']);
  S('defocus σ 2.5 px, plywood', { seed: 714, blurPx: 2.5, material: 'plywood' }, ['blurred']);
  for (const [i, [len, ang]] of ([[8, 20], [14, 135], [20, 80], [11, 0]] as const).entries()) S(`motion ${len} px at ${ang}°`, { seed: 721 + i }, ['motion-blur'], { motionBlurPx: len, motionAngleDeg: ang });
  // a smear that wipes out small bores: the holes cannot be sampled, the target's mark still is
  c.push({ name: 'motion 8 px at 120°, 1600 × 1200, M6 bores', pattern: M6, options: { width: 1600, height: 1200, supersample: 2, seed: 772 }, degrade: { motionBlurPx: 8, motionAngleDeg: 120 }, expect: ['motion-blur'] });
  S('over-exposed ×1.9', { seed: 731 }, ['overexposed'], { gain: 1.9 });
  S('over-exposed ×2.2, 7° tilt', { seed: 732, tiltDeg: 7 }, ['overexposed'], { gain: 2.2 });
  S('over-exposed ×1.9, phone camera', { seed: 734, camera: 'phone' }, ['overexposed'], { gain: 1.9 });
  S('under-exposed (low light ×0.15)', { seed: 733, exposure: 0.15, noise: 3 }, ['underexposed']);
  S('25° tilt', { seed: 741, tiltDeg: 25 }, ['tilted']);
  S('25° tilt, turned 30°', { seed: 742, tiltDeg: 25, turnDeg: 30 }, ['tilted']);
  S('target cut by the border', { seed: 751 }, ['target-cut'], cutThroughTarget);
  S('target cut by the border, 6° tilt', { seed: 752, tiltDeg: 6 }, ['target-cut'], cutThroughTarget);
  S('bed cut by the border', { seed: 761 }, ['bed-cut'], cutAwayFromTarget);
  S('bed cut by the border, 8° tilt', { seed: 762, tiltDeg: 8 }, ['bed-cut'], cutAwayFromTarget);
  // a 12 MP photo of the 1.3 m bed resized as a messenger would: 8 mm inserts end up near 8 px, the target near 190 px
  c.push({ name: '12 MP downscaled to 1600 × 1200', pattern: LARGE, options: {}, photo: big, degrade: { downscale: { width: 1600, height: 1200 } }, expect: [] });
  return c;
}

async function detection(big: { jpeg: Buffer; truth: Truth }) {
  const per = Object.fromEntries(PHOTO_ISSUE_CODES.map((k) => [k, { photos: 0, hits: 0, falseAlarms: 0 }])) as Record<PhotoIssueCode, { photos: number; hits: number; falseAlarms: number }>;
  const rows: { name: string; expected: PhotoIssueCode[]; got: PhotoIssueCode[]; ms: number }[] = [];
  let good = 0;
  let goodClean = 0;
  for (const k of cases(big)) {
    const src = k.photo ?? (await synthesize(k.pattern, k.options));
    const d = typeof k.degrade === 'function' ? k.degrade(src.truth) : k.degrade;
    const dg = d ? await degrade(src.jpeg, d) : null;
    const bytes = dg ? dg.jpeg : src.jpeg;
    const q = await checkPhotoQuality(bytes, k.pattern, { referenceMm: src.truth.target.sizeMm });
    const got = q.issues.map((i) => i.code);
    // sizes are facts of the rendered photo: from the renderer's true target corners (and the resize), a target or
    // holes under the stage's limits are issues this photo truly has, whatever else was done to it
    if (!k.expect.includes('target-cut')) {
      const c = src.truth.target.cornersPx;
      const sc = dg ? (dg.scale[0] + dg.scale[1]) / 2 : 1;
      const side = (sc * [0, 1, 2, 3].reduce((a, i) => a + Math.hypot(c[(i + 1) % 4]![0] - c[i]![0], c[(i + 1) % 4]![1] - c[i]![1]), 0)) / 4;
      const holeMm = Math.min(...k.pattern.families.map((f) => f.holeDiameter * (k.pattern.units === 'in' ? 25.4 : 1)));
      if (side < LIMITS.targetSidePx && !k.expect.includes('target-small')) k.expect.push('target-small');
      if ((side / src.truth.target.sizeMm) * holeMm < LIMITS.holeDiameterPx && !k.expect.includes('holes-small')) k.expect.push('holes-small');
    }
    for (const e of k.expect) {
      per[e].photos++;
      if (got.includes(e)) per[e].hits++;
    }
    for (const g of got) if (!k.expect.includes(g)) per[g].falseAlarms++;
    if (!k.expect.length) {
      good++;
      if (!got.length) goodClean++;
    }
    rows.push({ name: k.name, expected: k.expect, got, ms: q.timeMs });
  }
  const tot = Object.values(per).reduce((a, v) => ({ photos: a.photos + v.photos, hits: a.hits + v.hits, falseAlarms: a.falseAlarms + v.falseAlarms }), { photos: 0, hits: 0, falseAlarms: 0 });
  return { photos: rows.length, perCode: per, total: tot, goodPhotos: good, goodWithNoIssue: goodClean, rows };
}

/** Seeded photos across the renderer's ranges for predicted-versus-measured accuracy. */
function ratioScenes(n: number): { pattern: Pattern; options: Partial<SceneOptions> }[] {
  const out: { pattern: Pattern; options: Partial<SceneOptions> }[] = [];
  for (let i = 0; i < n; i++) {
    const large = i % 6 === 5;
    out.push({
      pattern: large ? LARGE : SMALL,
      options: {
        ...(large ? { width: 2400, height: 1800, supersample: 2 } : SMALL_BASE),
        seed: 800 + i, tiltDeg: (i * 3) % 16, turnDeg: ((i * 7) % 21) - 10, blurPx: 0.5 + (i % 4) * 0.3, jpegQuality: 80 + (i % 3) * 7, noise: 2 + (i % 3),
        material: i % 2 ? 'plywood' : 'mdf', k1: -0.05 + (i % 5) * 0.02, camera: i % 7 === 3 ? 'phone' : 'linear',
      },
    });
  }
  return out;
}

async function accuracy(n: number) {
  const rows: { seed: number; predictedMm: number; measuredMm: number; centreMm: number; predictedPpm: number; scaleErrPpm: [number, number]; issues: PhotoIssueCode[] }[] = [];
  for (const s of ratioScenes(n)) {
    const { jpeg, truth } = await synthesize(s.pattern, s.options);
    const { report, meta, points } = await analyzeImage(jpeg, s.pattern, { referenceMm: truth.target.sizeMm });
    const p = meta.quality.predicted;
    if (!p) continue;
    const pos = positionErrorAfterSimilarityMm(report, truth);
    // the report's scale X and Y against the renderer's injected scale errors (scene.ts: lattice term), ppm
    const ex = (report.lattice.scaleX! - (1 + truth.errors.scaleX)) * 1e6;
    const ey = (report.lattice.scaleY! - (1 + truth.errors.scaleY)) * 1e6;
    // the detector's hole centres against the renderer's projected truth (2-D RMS, px), in mm at the photo's scale
    const centreMm = scoreDetections(points, truth).rmsPx * truth.mmPerPx;
    rows.push({ seed: s.options.seed!, predictedMm: p.positionMm, measuredMm: r(pos.rmsMm, 1e5), centreMm: r(centreMm, 1e5), predictedPpm: p.scalePpm, scaleErrPpm: [Math.round(ex), Math.round(ey)], issues: meta.quality.issues.map((i) => i.code) });
  }
  const perPhoto = rows.map((x) => x.predictedMm / x.measuredMm);
  return {
    photos: rows.length,
    target: '0.5–2',
    position: { ratio: r(rms(rows.map((x) => x.predictedMm)) / rms(rows.map((x) => x.measuredMm))), perPhotoMin: r(Math.min(...perPhoto)), perPhotoMedian: r(median(perPhoto)), perPhotoMax: r(Math.max(...perPhoto)), predictedRmsMm: r(rms(rows.map((x) => x.predictedMm)), 1e4), measuredRmsMm: r(rms(rows.map((x) => x.measuredMm)), 1e4), centresAloneRmsMm: r(rms(rows.map((x) => x.centreMm)), 1e4) },
    scale: { ratio: r(rms(rows.map((x) => x.predictedPpm)) / rms(rows.flatMap((x) => x.scaleErrPpm))), predictedRmsPpm: Math.round(rms(rows.map((x) => x.predictedPpm))), measuredRmsPpm: Math.round(rms(rows.flatMap((x) => x.scaleErrPpm))), measuredMeanPpm: Math.round(rows.flatMap((x) => x.scaleErrPpm).reduce((a, b) => a + b, 0) / (2 * rows.length)) },
    rows,
  };
}

/** Runs the quality bench; `only` limits it to one part (for working on one figure). */
export async function qualityBench(opts: { only?: 'time' | 'codes' | 'accuracy'; photos?: number } = {}) {
  const t0 = performance.now();
  const need = !opts.only || opts.only !== 'accuracy';
  const big = need ? await twelveMp() : undefined;
  const out: Record<string, unknown> = { bench: 'quality', cores: os.cpus().length };
  if (!opts.only || opts.only === 'time') out.time = await timing(big!);
  if (!opts.only || opts.only === 'codes') out.codes = await detection(big!);
  if (!opts.only || opts.only === 'accuracy') out.accuracy = await accuracy(opts.photos ?? 24);
  out.benchSeconds = Math.round((performance.now() - t0) / 1000);
  return out;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const only = process.argv.find((a) => a.startsWith('--only='))?.slice(7) as 'time' | 'codes' | 'accuracy' | undefined;
  const photos = Number(process.argv.find((a) => a.startsWith('--photos='))?.slice(9) ?? 24);
  process.stdout.write(`${JSON.stringify(await qualityBench({ ...(only ? { only } : {}), photos }), null, 1)}\n`);
}
