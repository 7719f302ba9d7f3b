import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { publicReport } from '@/lib/services/share-report';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';

describe("a shared report's measured distances", () => {
  it('keeps the distances given with the check, which hold nothing of the photo', () => {
    const scene = makeScene({ pattern: SMALL_PATTERN, seed: 3, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 150, y: 330, angleDeg: 5 } });
    // dog A1 to dog D1: three 96 mm pitches (the fixture's nominal pattern).
    const report = analyzePoints(scene.points, SMALL_PATTERN, { distances: [{ from: 'dog A1', to: 'dog D1', mm: 288, sigmaMm: 0.3 }] });
    const shared = ReportSchema.parse(publicReport(report));
    expect(shared.distances).toEqual(report.distances);
    expect(Object.keys(shared.distances![0]!).sort()).toEqual(['fittedMm', 'from', 'mm', 'residualMm', 'residualSigmas', 'sigmaMm', 'squareMm', 'to', 'used']);
  });
});
