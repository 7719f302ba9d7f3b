/**
 * The photo-quality stage on photos made bad on purpose: rendered scenes (lib/vision/render) degraded by a known
 * amount (lib/vision/render/degrade.ts). The truth of each check is the degradation we applied, not an output of
 * the stage: a defocus σ, a smear of known length and direction, a gain, a resize, a tilt, a crop through the target.
 * Sizes are 1.1 MP (the small bed) so that the file runs in well under a minute; the 12 MP timing and the
 * predicted-versus-measured accuracy over 24 seeded photos are in the bench (tests/bench/quality.bench.ts); four here.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { PatternSchema, PhotoQualitySchema, type Pattern, type PhotoQuality } from '@/lib/geometry/contract';
import { analyzeImage, checkPhotoQuality, VisionInputError } from '@/lib/vision';
import { ISSUE_ADVICE } from '@/lib/vision/advice';
import { positionErrorAfterSimilarityMm } from './score';
import { synthesize, type SceneOptions, type Truth } from '@/lib/vision/render';
import { degrade, type Degradation } from '@/lib/vision/render/degrade';
import { cutThroughTarget, SMALL_BED } from './scenes';

const LARGE_BED: Pattern = PatternSchema.parse(JSON.parse(readFileSync(new URL('../fixtures/vision/bed-large.json', import.meta.url), 'utf8')));
const base: Partial<SceneOptions> = { width: 1200, height: 900, supersample: 3 };

async function quality(pattern: Pattern, options: Partial<SceneOptions>, deg?: Degradation | ((t: Truth) => Degradation)): Promise<PhotoQuality> {
  const { jpeg, truth } = await synthesize(pattern, { ...base, ...options });
  const bytes = deg ? (await degrade(jpeg, typeof deg === 'function' ? deg(truth) : deg)).jpeg : jpeg;
  const q = await checkPhotoQuality(bytes, pattern, { referenceMm: truth.target.sizeMm });
  // the stage's output is the report contract's photo.quality
  return PhotoQualitySchema.parse(q);
}
const codes = (q: PhotoQuality) => q.issues.map((i) => i.code).sort();

describe('photo-quality stage', () => {
  it('gives sharp, well-lit photos from nearly straight above no issue, and a prediction', async () => {
    for (const seed of [101, 107]) {
      const q = await quality(SMALL_BED, { seed, tiltDeg: seed === 101 ? 0 : 6, lightGradient: seed === 107 ? 0.4 : 0.15 });
      expect(codes(q)).toEqual([]);
      expect(q.predicted?.positionMm).toBeGreaterThan(0);
      expect(q.predicted?.scalePpm).toBeGreaterThan(0);
      // tilt from the target's homography against the renderer's camera (0° or 6° from straight down)
      expect(Math.abs(q.measured.tiltDeg! - (seed === 101 ? 0 : 6))).toBeLessThan(2);
    }
  }, 60_000);

  it('calls defocus of σ 2 to 4 px blurred, measures the σ to a quarter, and says nothing else', async () => {
    for (const [seed, sigma] of [[301, 2], [303, 4]] as const) {
      const q = await quality(SMALL_BED, { seed, blurPx: sigma });
      expect(codes(q)).toEqual(['blurred']);
      // truth: the renderer's Gaussian σ in linear light (render.ts blurPlane); pixel area adds 1/12 px² (common practice)
      expect(Math.abs(q.measured.defocusSigmaPx! - Math.sqrt(sigma * sigma + 1 / 12)) / sigma).toBeLessThan(0.25);
      expect(q.issues[0]!.message).toMatch(/spread over \d+(\.\d)? px/);
    }
  }, 60_000);

  it('calls a smear of 8 to 20 px motion blur and finds its length and direction', async () => {
    for (const [seed, length, angle] of [[311, 8, 30], [312, 14, 160], [313, 20, 100]] as const) {
      const q = await quality(SMALL_BED, { seed }, { motionBlurPx: length, motionAngleDeg: angle });
      expect(codes(q)).toEqual(['motion-blur']);
      // truth: the box smear we applied; a box of length L has variance L²/12 (its second moment)
      expect(Math.abs(q.measured.motion!.lengthPx - length) / length).toBeLessThan(0.3);
      const dAngle = Math.abs(((q.measured.motion!.directionDeg - angle) % 180 + 270) % 180 - 90);
      expect(dAngle).toBeLessThan(12);
    }
  }, 60_000);

  it('calls a smear of 8 and 14 px over flanged inserts motion blur alone, though the flanges cut the holes\' smear short', async () => {
    // 1600 × 1200, a 600 × 400 mm bed of M8 inserts whose bright flange (1.75 times the bore, the renderer's) lies
    // within the smear of the bore's rim: the holes read the smear short, the target's edges across and along it do not
    const m8: Pattern = PatternSchema.parse({ version: 1, name: 'M8 inserts at 50 mm', units: 'mm', bed: { width: 600, height: 400 }, families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter: 8, origin: { x: 50, y: 50 }, pitch: { x: 50, y: 50 }, count: { x: 11, y: 7 }, fit: { fastener: 'M8', clearance: 'medium' } }] });
    for (const [seed, length] of [[781, 8], [782, 14]] as const) {
      const q = await quality(m8, { seed, width: 1600, height: 1200, supersample: 2 }, { motionBlurPx: length, motionAngleDeg: 120 });
      expect(codes(q)).toEqual(['motion-blur']);
      // truth: the box smear we applied (length, direction), as in the test above
      expect(Math.abs(q.measured.motion!.lengthPx - length) / length).toBeLessThan(0.3);
      const dAngle = Math.abs(((q.measured.motion!.directionDeg - 120) % 180 + 270) % 180 - 90);
      expect(dAngle).toBeLessThan(12);
    }
  }, 60_000);

  it('calls a photo exposed 1.9 times too long over-exposed, from a plain camera and from a phone', async () => {
    // truth: the gain we applied in linear light, clipped at white (degrade.ts); the phone's tone curve darkens the
    // black first, so its clipped print still reads over 16 times its black: the frame's stroke thinned by the
    // clipped white's cut-short edges tells it
    for (const [seed, camera] of [[321, 'linear'], [734, 'phone']] as const) {
      const q = await quality(SMALL_BED, { seed, camera }, { gain: 1.9 });
      expect(codes(q)).toEqual(['overexposed']);
      expect(q.issues[0]!.advice).toMatch(/flash/);
    }
  }, 60_000);

  it('does not call a phone photo over-exposed when its tone curve and sharpening merely bring its white to clipping', async () => {
    // the phone pipeline (render.ts: contrast curve, unsharp mask) clips the paper next to the edge by overshoot;
    // the print's contrast stays that of toner on paper, 16–30 (optical density 1.2–1.5, from memory), or more
    // through the tone curve; its default curve, and the full mid-tone curve with strong sharpening
    for (const o of [{ seed: 706, tiltDeg: 5 }, { seed: 736, contrast: 1, sharpenAmount: 1.5 }]) {
      const q = await quality(SMALL_BED, { ...o, camera: 'phone' });
      expect(codes(q)).toEqual([]);
      expect(q.measured.targetContrast!).toBeGreaterThan(16);
    }
  }, 60_000);

  it('calls a photo taken in too little light under-exposed', async () => {
    // the renderer's exposure 0.15: the paper's linear light at 15 %, over 2.5 stops under (log2 1/0.15 = 2.7)
    const q = await quality(SMALL_BED, { seed: 733, exposure: 0.15, noise: 3 });
    expect(codes(q)).toEqual(['underexposed']);
    expect(q.issues[0]!.advice).toMatch(/light/);
  }, 30_000);

  it('predicts the position and scale 1σ within a factor 2 of the errors measured against the truth', async () => {
    // truth: the renderer's true bed positions (after the best similarity, as the contract defines positionMm) and
    // its injected scale; four photos pooled here, 24 in the bench
    const pred: number[] = [], meas: number[] = [], predS: number[] = [], measS: number[] = [];
    for (const [seed, blurPx, tiltDeg] of [[121, 0.5, 0], [122, 0.9, 6], [123, 1.2, 10], [124, 0.7, 14]] as const) {
      const { jpeg, truth } = await synthesize(SMALL_BED, { ...base, seed, blurPx, tiltDeg });
      const { report, meta } = await analyzeImage(jpeg, SMALL_BED, { referenceMm: truth.target.sizeMm });
      pred.push(meta.quality.predicted!.positionMm);
      meas.push(positionErrorAfterSimilarityMm(report, truth).rmsMm);
      predS.push(meta.quality.predicted!.scalePpm, meta.quality.predicted!.scalePpm);
      measS.push((report.lattice.scaleX! - 1 - truth.errors.scaleX) * 1e6, (report.lattice.scaleY! - 1 - truth.errors.scaleY) * 1e6);
    }
    const rms = (v: number[]) => Math.sqrt(v.reduce((a, x) => a + x * x, 0) / v.length);
    expect(rms(pred) / rms(meas)).toBeGreaterThan(0.5);
    expect(rms(pred) / rms(meas)).toBeLessThan(2);
    // 8 scale errors (X and Y of 4 photos): an RMS of a few samples scatters, so a factor 3 either way
    expect(rms(predS) / rms(measS)).toBeGreaterThan(1 / 3);
    expect(rms(predS) / rms(measS)).toBeLessThan(3);
  }, 120_000);

  it('calls holes too small in a 12 MP-framed bed downscaled to 1600 × 1200', async () => {
    // the large bed (1.3 m) rendered at 1800 × 1350 and resized as a messenger would: inserts of 8 mm end up near 8 px
    const q = await quality(LARGE_BED, { seed: 331, width: 1800, height: 1350, supersample: 2 }, { downscale: { width: 1600, height: 1200 } });
    expect(q.measured.widthPx).toBe(1600);
    expect(codes(q)).toContain('holes-small');
    expect(codes(q).every((c) => c === 'holes-small' || c === 'target-small')).toBe(true);
  }, 60_000);

  it('calls a 25° view tilted and measures the tilt to 2°', async () => {
    const q = await quality(SMALL_BED, { seed: 341, tiltDeg: 25 });
    expect(codes(q)).toEqual(['tilted']);
    // truth: the renderer's camera tilt from straight down (scene.ts), with the same 27 mm-equivalent lens
    expect(Math.abs(q.measured.tiltDeg! - 25)).toBeLessThan(2);
  }, 30_000);

  it('calls a target cut by the border of the photo target-cut and nothing else, and the photo cannot be measured', async () => {
    // the crop through the middle of the target (the renderer's true corners) keeps the half without the
    // orientation mark (seed 351) or with it (752: the whole mark, a filled square, stays in the photo)
    for (const [seed, tiltDeg] of [[351, 0], [752, 6]] as const) {
      const q = await quality(SMALL_BED, { seed, tiltDeg }, cutThroughTarget);
      expect(codes(q)).toEqual(['target-cut']);
      expect(q.predicted).toBeNull();
    }
  }, 60_000);

  it('does not measure the bed from the orientation mark of a cut target: the analysis fails as no square with the target-cut advice', async () => {
    // the crop through the target that keeps its whole mark (seed 752, as above): the square search finds the mark,
    // a tenth of the target's side (target.ts); a report measured from it would be ten times off in scale
    const { jpeg, truth } = await synthesize(SMALL_BED, { ...base, seed: 752, tiltDeg: 6 });
    const bytes = (await degrade(jpeg, cutThroughTarget(truth))).jpeg;
    const seen: PhotoQuality[] = [];
    const run = analyzeImage(bytes, SMALL_BED, { referenceMm: truth.target.sizeMm, onQuality: (q) => void seen.push(q) });
    const error = await run.then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(VisionInputError);
    expect((error as VisionInputError).code).toBe('no-square');
    expect((error as VisionInputError).message).toContain(ISSUE_ADVICE['target-cut']);
    // the verdict stored before the failure is the cut target alone, with no prediction
    expect(seen.map(codes)).toEqual([['target-cut']]);
    expect(seen[0]!.predicted).toBeNull();
  }, 60_000);
});
