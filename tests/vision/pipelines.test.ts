/**
 * One rendered scene through the three camera pipelines (lib/vision/render: a plain camera blurring in linear light
 * then encoding with the sRGB transfer function, IEC 61966-2-1; a phone adding a mid-tone contrast curve and an
 * unsharp mask; blur applied to the encoded values). The corners from the frame stroke's centreline stay put; the
 * outer edge alone moves with the tone curve, as the sRGB curve predicts.
 *
 * The prediction: the edge finder places a side where the area under the normalised profile across it says
 * (square.ts refineCorners), so a side moves by ∫ (n(x) − H(x)) dx, with n the encoded profile normalised between its
 * dark and light levels and H the true step. In linear light the profile is the step blurred by a Gaussian of σ
 * (the defocus and the pixel's own box, variance 1/12 px²) and then encoded: the concave sRGB curve lifts it, the
 * light side spreads into the dark. When the blur acts on the encoded values it keeps the area, and only the pixel's
 * box (integrated in linear light, then encoded) moves the side. Levels: ink 0.035 and paper 0.82 reflectance under
 * exposure 1.25 (the renderer's scene model), defocus σ 0.7 px, no light gradient or vignetting.
 */
import { describe, expect, it } from 'vitest';
import { loadPhoto, reduce } from '@/lib/vision/load';
import { CAMERA_PIPELINES, synthesizeCameras } from '@/lib/vision/render';
import { findSquare, refineCorners, type Corners } from '@/lib/vision/square';
import { SMALL_BED } from './scenes';

// sRGB transfer function (IEC 61966-2-1)
const enc = (l: number) => (l <= 0.0031308 ? 12.92 * l : 1.055 * Math.min(1, l) ** (1 / 2.4) - 0.055);
/** Standard normal distribution function, by the Abramowitz & Stegun 7.1.26 erf approximation (|error| < 1.5e-7; from memory). */
function Phi(x: number): number {
  const z = Math.abs(x) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * z);
  const erf = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-z * z);
  return x >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}
/** ∫ (n(x) − H(x)) dx over ±6 px by the midpoint rule: how far an area-located edge moves into the dark side, px. */
function areaShift(linearProfile: (x: number) => number, d: number, l: number): number {
  const n = (L: number) => (enc(L) - enc(d)) / (enc(l) - enc(d));
  const N = 12000;
  let s = 0;
  for (let i = 0; i < N; i++) {
    const x = -6 + (12 * (i + 0.5)) / N;
    s += (n(linearProfile(x)) - (x > 0 ? 1 : 0)) * (12 / N);
  }
  return s;
}

const side = (c: Corners) => {
  let a = 0;
  for (let i = 0; i < 4; i++) a += c[i]![0] * c[(i + 1) % 4]![1] - c[(i + 1) % 4]![0] * c[i]![1];
  return Math.sqrt(Math.abs(a) / 2);
};

describe('camera pipelines and the stroke-centreline reference', () => {
  it('keeps the centreline corners within 0.05 px across the pipelines while the outer edge moves as the sRGB curve predicts', async () => {
    const { jpegs, truth } = await synthesizeCameras(SMALL_BED, { seed: 301, width: 1600, height: 1200, supersample: 4, tiltDeg: 4, lightGradient: 0, vignetting: 0, blurPx: 0.7, noise: 1, jpegQuality: 95 });
    const centre: Record<string, Corners> = {};
    const outer: Record<string, Corners> = {};
    for (const cam of CAMERA_PIPELINES) {
      const photo = await loadPhoto(jpegs[cam]);
      const factor = Math.max(1, Math.ceil(Math.max(photo.width, photo.height) / 1500));
      const sq = await findSquare(photo.grey, photo.width, photo.height, reduce(photo.grey, photo.width, photo.height, factor), factor);
      expect(sq?.reference).toBe('centreline');
      centre[cam] = sq!.corners;
      const o = refineCorners(photo.grey, photo.width, photo.height, truth.target.cornersPx.map((p) => [p[0], p[1]]) as Corners, 6);
      outer[cam] = o!.corners;
    }
    // centreline: the same corners from every camera, and the true ones (renderer's projection) within 0.15 px
    for (let i = 0; i < 4; i++) {
      for (const cam of CAMERA_PIPELINES) {
        expect(Math.hypot(centre[cam]![i]![0] - centre.linear![i]![0], centre[cam]![i]![1] - centre.linear![i]![1])).toBeLessThan(0.05);
        expect(Math.hypot(centre[cam]![i]![0] - truth.target.cornersPx[i]![0], centre[cam]![i]![1] - truth.target.cornersPx[i]![1])).toBeLessThan(0.15);
      }
    }
    // outer edge: each side of the dark square moves by the predicted difference of the two pipelines' area shifts
    const d = 0.035 * 1.25;
    const l = 0.82 * 1.25;
    const sigma = Math.sqrt(0.7 ** 2 + 1 / 12);
    const linear = areaShift((x) => d + (l - d) * Phi(x / sigma), d, l);
    const encoded = areaShift((x) => d + (l - d) * Math.min(1, Math.max(0, x + 0.5)), d, l);
    const predicted = encoded - linear; // px per side, negative: the dark square narrower in linear light
    expect(predicted).toBeLessThan(-0.2);
    const moved = (side(outer.linear!) - side(outer.encoded!)) / 2;
    expect(Math.abs(moved - predicted)).toBeLessThan(0.06);
    // the phone's contrast curve and sharpening move it further still
    expect((side(outer.phone!) - side(outer.encoded!)) / 2).toBeLessThan(predicted);
    // that move is what a scale from the outer edges alone would carry: over 1000 ppm on this 330 px square
    expect(Math.abs((2 * moved) / side(outer.encoded!)) * 1e6).toBeGreaterThan(1000);
  }, 120_000);
});
