/**
 * A straight smear measured on the target's orientation mark (lib/vision/mark-spread.ts) when the holes cannot be
 * sampled: M6 bores (6 mm) on a 1200 × 900 mm bed in a 1600 × 1200 photo are about 8 px across, and a smear of 8 px
 * wipes them out of the candidate pass. Truth: the box smear we applied (lib/vision/render/degrade.ts, its length
 * and direction in image px); a box of length L has variance L²/12 (its second moment).
 */
import { describe, expect, it } from 'vitest';
import { PatternSchema } from '@/lib/geometry/contract';
import { checkPhotoQuality } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';
import { degrade } from '@/lib/vision/render/degrade';

const M6 = PatternSchema.parse({
  version: 1, name: 'M6 at 100 mm', units: 'mm', bed: { width: 1200, height: 900 },
  families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter: 6, origin: { x: 50, y: 50 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 9 }, fit: { fastener: 'M6', clearance: 'medium' } }],
});

describe('mark spread', () => {
  it('calls an 8 px smear of a photo whose holes it wipes out motion blur, with its length and direction, not defocus', async () => {
    for (const [seed, angle] of [[771, 30], [772, 120]] as const) {
      const { jpeg, truth } = await synthesize(M6, { width: 1600, height: 1200, supersample: 2, seed });
      const q = await checkPhotoQuality((await degrade(jpeg, { motionBlurPx: 8, motionAngleDeg: angle })).jpeg, M6, { referenceMm: truth.target.sizeMm });
      expect(q.measured.holesSampled).toBeLessThan(5);
      // the target truly spans under 200 px and the bores under 10 px (renderer's truth): those codes are right too
      expect(q.issues.map((i) => i.code).sort()).toEqual(['holes-small', 'motion-blur', 'target-small']);
      expect(Math.abs(q.measured.motion!.lengthPx - 8) / 8).toBeLessThan(0.3);
      const dAngle = Math.abs(((q.measured.motion!.directionDeg - angle) % 180 + 270) % 180 - 90);
      expect(dAngle).toBeLessThan(12);
    }
  }, 60_000);
});
