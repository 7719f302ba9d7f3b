import { describe, expect, it } from 'vitest';
import { analyzeImage, detectFromImage } from '@/lib/vision';
import { CAMERA_PIPELINES, synthesizeCameras } from '@/lib/vision/render';
import { SMALL_BED } from './scenes';

/**
 * The reference square's corners and their stated precision on rendered photos, against the renderer's exact
 * projection of the printed corners (lib/vision/render/camera.ts, a code path the detector never uses), through
 * the three camera pipelines (tone curves and sharpening move a dark/light edge by up to ±0.5 px).
 */
const OPTS = { width: 1200, height: 900, supersample: 3, seed: 41, tiltDeg: 8, k1: 0.04, k2: 0.01, blurPx: 0.8 } as const;

describe('reference square precision on rendered photos', () => {
  it('measures a framed target from its stroke: corners within 3σ of the truth in every pipeline, and the edge bias', async () => {
    const { jpegs, truth } = await synthesizeCameras(SMALL_BED, { ...OPTS, targetStyle: 'frame' });
    const bias: number[] = [];
    for (const cam of CAMERA_PIPELINES) {
      const { points, meta } = await detectFromImage(jpegs[cam], SMALL_BED, { referenceMm: truth.target.sizeMm });
      expect(meta.square.reference).toBe('centreline');
      expect(points.reference.cornerCovPx2).toHaveLength(64);
      const s = points.reference.cornerSigmaPx!;
      expect(s).toBeLessThan(0.1);
      points.reference.corners.forEach((c, i) => {
        const t = truth.target.cornersPx[i]!;
        expect(Math.hypot(c[0] - t[0], c[1] - t[1])).toBeLessThan(3 * Math.SQRT2 * Math.max(s, 0.01));
      });
      bias.push(meta.square.edgeBiasPx!);
    }
    // the phone's contrast and sharpening make the black read narrower, blur on encoded values wider
    expect(bias[1]!).toBeLessThan(bias[0]! - 0.1);
    expect(bias[2]!).toBeGreaterThan(bias[0]! + 0.1);
  }, 60_000);

  it('states a plain square\'s unmeasured edge bias in its corners\' 1σ, and its corners lie within it', async () => {
    const { jpegs, truth } = await synthesizeCameras(SMALL_BED, { ...OPTS, targetStyle: 'plain' });
    for (const cam of CAMERA_PIPELINES) {
      const { points, meta } = await detectFromImage(jpegs[cam], SMALL_BED, { referenceMm: truth.target.sizeMm });
      expect(meta.square.kind).toBe('square');
      expect(meta.square.reference).toBe('outer-edge');
      const s = points.reference.cornerSigmaPx!;
      // a 0.5 px bias moves a corner by about 0.5 px per axis (DEFAULT_BIAS_PRIOR)
      expect(s).toBeGreaterThan(0.4);
      points.reference.corners.forEach((c) => {
        const d = Math.min(...truth.target.cornersPx.map((t) => Math.hypot(c[0] - t[0], c[1] - t[1])));
        expect(d).toBeLessThan(3 * Math.SQRT2 * s);
      });
    }
  }, 60_000);

  it('states a scale 1σ of at most 150 ppm with the 150 mm target at about 0.4 mm/px, and the scale lies within 3σ of the truth in every pipeline', async () => {
    const { jpegs, truth } = await synthesizeCameras(SMALL_BED, { width: 1800, height: 1350, supersample: 3, seed: 43, tiltDeg: 6, k1: -0.04, k2: 0.01, blurPx: 0.8 });
    expect(truth.mmPerPx).toBeLessThan(0.45);
    for (const cam of CAMERA_PIPELINES) {
      const { report } = await analyzeImage(jpegs[cam], SMALL_BED, { referenceMm: truth.target.sizeMm });
      const L = report.lattice;
      expect(L.observed).toBe(true);
      for (const [got, want, sigma] of [[L.scaleX!, 1 + truth.errors.scaleX, L.uncertainty.scaleX!], [L.scaleY!, 1 + truth.errors.scaleY, L.uncertainty.scaleY!]] as const) {
        expect(sigma).toBeLessThan(150e-6);
        expect(Math.abs(got - want)).toBeLessThan(3 * sigma);
      }
    }
  }, 90_000);
});
