/**
 * The renderer speaks the report's language: a lattice rendered with injected scale and squareness errors is
 * measured, through detection and the fit, as those same errors with the same signs, within three times the
 * uncertainty the report states. Squareness is the angle between the lattice's X and Y axes minus 90°
 * (lib/geometry/affine.ts decomposeAffine), scale the length of each axis per nominal mm. A recovery test
 * against the renderer's forward model: the scenes are 1.1 MP, injected squareness 0.3° of either sign and
 * scale errors of ±3500 ppm, far outside the stated uncertainties so a flipped sign cannot pass.
 */
import { describe, expect, it } from 'vitest';
import { analyzeImage } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';
import { SMALL_BED } from './scenes';

const SCENE = { width: 1200, height: 900, supersample: 3, squarenessDeg: 0.5, scalePpm: 4000, panelOffsetMm: 0, misplacedCount: 0 };

describe('rendered lattice errors', () => {
  // seed 202 draws squareness +0.30° and scale X −3600 ppm; seed 211 draws −0.35° and scale Y +3500 ppm
  for (const seed of [202, 211]) {
    it(`come back from the report with their signs (seed ${seed})`, async () => {
      const { jpeg, truth } = await synthesize(SMALL_BED, { ...SCENE, seed });
      const { report } = await analyzeImage(jpeg, SMALL_BED, { referenceMm: truth.target.sizeMm });
      const l = report.lattice;
      expect(l.observed).toBe(true);
      const u = l.uncertainty;
      expect(Math.abs(truth.errors.squarenessDeg)).toBeGreaterThan(5 * u.squarenessDeg!);
      expect(Math.abs(l.squarenessDeg! - truth.errors.squarenessDeg)).toBeLessThan(3 * u.squarenessDeg!);
      expect(Math.abs(l.scaleX! - (1 + truth.errors.scaleX))).toBeLessThan(3 * u.scaleX!);
      expect(Math.abs(l.scaleY! - (1 + truth.errors.scaleY))).toBeLessThan(3 * u.scaleY!);
    }, 60_000);
  }
});
