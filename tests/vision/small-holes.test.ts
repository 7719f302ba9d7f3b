/**
 * Holes small for the photo's scale are still all found: M6 bores (6 mm, ISO 273 clearance for M6 is 6.4–7 mm; the
 * insert's bore is the thread's 6 mm, from memory) at 100 mm pitch on a 1200 × 900 mm bed in a 1600 × 1200 photo,
 * about 8 px across — too small to survive the 2× reduced image the candidate pass would otherwise use. The renderer's
 * truth (lib/vision/render) says which holes are visible and where.
 */
import { describe, expect, it } from 'vitest';
import { PatternSchema } from '@/lib/geometry/contract';
import { detectFromImage } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';
import { scoreDetections } from './score';

const M6 = PatternSchema.parse({
  version: 1, name: 'M6 at 100 mm', units: 'mm', bed: { width: 1200, height: 900 },
  families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter: 6, origin: { x: 50, y: 50 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 9 }, fit: { fastener: 'M6', clearance: 'medium' } }],
});

describe('small holes', () => {
  it('finds every visible M6 bore about 8 px across, and no false one', async () => {
    const { jpeg, truth } = await synthesize(M6, { seed: 77, width: 1600, height: 1200, tiltDeg: 4, camera: 'phone', sharpenPx: 1.5, sharpenAmount: 1.2 });
    expect(6 / truth.mmPerPx).toBeLessThan(9);
    const { points } = await detectFromImage(jpeg, M6, { referenceMm: truth.target.sizeMm });
    const s = scoreDetections(points, truth);
    expect(s.visible).toBeGreaterThan(90);
    expect(s.foundFraction).toBeGreaterThanOrEqual(0.99);
    expect(s.falseDetections).toBe(0);
  }, 60_000);
});
