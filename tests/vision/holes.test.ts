/**
 * Holes of a defocused photo: blur closes a rim in (its floor lifts, so the half-way level lies inside the true
 * rim) and the size gate judges it by the size its fitted blur implies (lib/vision/blurred-rim.ts). Truth: the
 * renderer's projected hole centres and visibility (lib/vision/render), a code path the detector never uses.
 */
import { describe, expect, it } from 'vitest';
import { detectFromImage } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';
import { SMALL_BED } from './scenes';
import { scoreDetections } from './score';

describe('holes', () => {
  it('finds nine in ten holes of a photo defocused by σ 3 and 4 px, flanged inserts too, and no false one', async () => {
    for (const [seed, blurPx, tiltDeg] of [[712, 3, 5], [713, 4, 7]] as const) {
      const { jpeg, truth } = await synthesize(SMALL_BED, { width: 1200, height: 900, supersample: 3, seed, blurPx, tiltDeg });
      for (const method of ['centroid', 'edge'] as const) {
        const { points } = await detectFromImage(jpeg, SMALL_BED, { referenceMm: truth.target.sizeMm, method });
        const s = scoreDetections(points, truth);
        expect(s.foundFraction).toBeGreaterThan(0.9);
        expect(s.falseDetections).toBe(0);
      }
    }
  }, 60_000);
});
