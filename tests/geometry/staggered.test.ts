import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import type { Pattern } from '@/lib/geometry/contract';
import { buildLattice } from '@/lib/geometry/lattice';
import { makeScene } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';

// A staggered grid: two interleaved families of one hole size, rows of 7 at 40 mm, every other row offset by half a
// pitch (the layout of an asymmetric circle grid). Invented data, for the method only.
const fit = { toleranceMm: 1 };
const staggered: Pattern = {
  version: 1, name: 'staggered', units: 'mm', bed: { width: 320, height: 280 },
  families: [
    { id: 'a', kind: 'other', holeDiameter: 13, origin: { x: 40, y: 20 }, pitch: { x: 40, y: 40 }, count: { x: 7, y: 7 }, fit },
    { id: 'b', kind: 'other', holeDiameter: 13, origin: { x: 20, y: 40 }, pitch: { x: 40, y: 40 }, count: { x: 7, y: 6 }, fit },
  ],
};

describe('correspondence on a staggered grid under strong perspective', () => {
  for (const seed of [1, 2, 3, 4, 5, 6]) {
    it(`matches every seen hole to its own node with a small square in one corner (seed ${seed})`, () => {
      // 30° tilt and a 60 mm square seen at about 1 mm/px: the square's own frame is far off across the bed, so
      // the first whole-pitch placement can be a pitch (or the families' offset) wrong.
      const scene = makeScene({ pattern: staggered, seed, tiltDeg: 30, tiltAzimuthDeg: 200 + 40 * seed, mmPerPx: 1, k1: -0.05, centreNoisePx: 0.05, cornerNoisePx: 0.05, square: { sizeMm: 60, x: 270, y: 60, angleDeg: 3 } });
      const r = analyzePoints(scene.points, staggered);
      const lat = buildLattice(patternToMm(staggered));
      const seen = lat.positions.filter((_, i) => scene.truth.seen[i]).length;
      // The truth: each detection's own node (synthetic.ts keeps it). Every seen position measured, nothing left
      // over, and each measured position is the node the detection came from (its deviation is small).
      expect(r.summary.matched).toBe(seen);
      expect(r.unmatched.length).toBe(0);
      expect(r.summary.maxMm).toBeLessThan(1);
    });
  }
});
