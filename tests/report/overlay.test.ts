import { describe, expect, it } from 'vitest';
import { analyzePoints, presetById } from '@/lib/geometry';
import { projectBedPoint } from '@/lib/geometry/camera';
import { makeScene } from '@/lib/geometry/synthetic';
import { photoOverlay } from '@/lib/report/overlay';

const preset = (id: string) => presetById(id)!;

describe('photo overlay', () => {
  // Truth comes from the synthetic scene's own camera (pinhole + Brown–Conrady), independent of the pairing.
  it('pairs each matched detection with the position the scene put there, on a turned and tilted photo', () => {
    const pat = preset('in-3-quarter20-dogs').size({ bedWidthMm: 1220, bedHeightMm: 915 });
    const scene = makeScene({ pattern: pat, seed: 3, tiltDeg: 8, rollDeg: 20, k1: -0.02, centreNoisePx: 0.08, cornerNoisePx: 0.1, missingFraction: 0.03, spuriousFraction: 0.03, square: { sizeMm: 200, x: 400, y: 300, angleDeg: 35 } });
    const report = analyzePoints(scene.points, pat);
    const o = photoOverlay(report, scene.points);
    let paired = 0;
    scene.points.holes.forEach((_, d) => {
      const p = o.detectionPosition[d]!;
      if (p < 0) return;
      paired++;
      expect(scene.truth.detPos[d]).toBe(p);
    });
    expect(paired).toBe(report.summary.matched);
    expect(o.detectionVerdict.filter((v) => v === 'unmatched')).toHaveLength(report.unmatched.length);
  });

  it('places positions that were not seen within a few px of where the camera would show them', () => {
    const pat = preset('m6-50').size({ bedWidthMm: 800, bedHeightMm: 600 });
    const scene = makeScene({ pattern: pat, seed: 9, tiltDeg: 4, rollDeg: -10, centreNoisePx: 0.05, missingFraction: 0.08 });
    const report = analyzePoints(scene.points, pat);
    const o = photoOverlay(report, scene.points);
    const unseen = report.positions.map((p, i) => ({ p, i })).filter(({ p }) => !p.measured);
    expect(unseen.length).toBeGreaterThan(5);
    for (const { i } of unseen) {
      const truth = projectBedPoint(scene.truth.camera, scene.truth.trueXY[2 * i]!, scene.truth.trueXY[2 * i + 1]!)!;
      const got = o.positionPx[i]!;
      // a plain homography ignores lens distortion (k1 = 0 here) and the holes' own errors: a few px at most
      expect(Math.hypot(got.x - truth[0], got.y - truth[1])).toBeLessThan(4);
    }
  });
});
