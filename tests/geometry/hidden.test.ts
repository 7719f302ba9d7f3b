/**
 * Holes seen only in part are not measured (issue 11): from a points file, a detection whose rim, with the blur margin
 * (RIM_MARGIN_PX), meets the reference sheet's outline or the photo's border is left out, and its position — like one
 * the detector reports seen in part — is not seen, with the reason, never in or out. Scenes from the geometry core's
 * own forward model (lib/geometry/synthetic.ts: pinhole camera, exact projections).
 */
import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { PatternSchema, type Points } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';

const PATTERN = PatternSchema.parse({
  version: 1, name: 'M8 at 50 mm', units: 'mm', bed: { width: 800, height: 500 },
  families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter: 10, origin: { x: 50, y: 50 }, pitch: { x: 50, y: 50 }, count: { x: 15, y: 9 }, fit: { fastener: 'M8', clearance: 'medium' } }],
});

describe('holes seen in part, from a points file', () => {
  it('are not measured where the sheet covers a quarter of the rim, the border cuts it, or the detector saw them in part', () => {
    const scene = makeScene({ pattern: PATTERN, seed: 3, centreNoisePx: 0.05, square: { sizeMm: 150, x: 400, y: 250, angleDeg: 0 } });
    const pts = structuredClone(scene.points) as Points;
    const posOf = (i: number) => scene.truth.detPos[i]!;
    // the sheet's right edge across a hole a quarter of its diameter in; one other hole the detector saw in part
    const byX = pts.holes.map((h, i) => ({ h, i })).sort((a, b) => a.h.x - b.h.x);
    const mid = byX[Math.floor(byX.length / 2)]!;
    const r = mid.h.diameterPx / 2;
    const edge = mid.h.x - r + 0.25 * 2 * r;
    pts.sheet = [[edge - 300, mid.h.y - 5], [edge, mid.h.y - 5], [edge, mid.h.y + 5], [edge - 300, mid.h.y + 5]];
    const other = byX[5]!;
    pts.hidden = [{ x: other.h.x, y: other.h.y, diameterPx: other.h.diameterPx, by: 'occluded' }];
    // the photo's right border through the rims of the rightmost column
    const last = byX[byX.length - 1]!;
    const width = Math.floor(last.h.x + 0.5 * (last.h.diameterPx / 2));
    const cutByBorder = byX.filter((o) => o.h.x > width - o.h.diameterPx / 2 - 4 && o.h.x <= width).map((o) => posOf(o.i));
    pts.image.width = width;
    pts.holes = pts.holes.filter((h, i) => h.x <= width && i !== other.i);
    const report = analyzePoints(pts, PATTERN);
    const sheetPos = report.positions[posOf(mid.i)]!;
    expect(sheetPos.measured).toBeNull();
    expect(sheetPos.verdict).toBe('missing');
    expect(sheetPos.hiddenBy).toBe('sheet');
    const occluded = report.positions[posOf(other.i)]!;
    expect(occluded.verdict).toBe('missing');
    expect(occluded.hiddenBy).toBe('occluded');
    expect(cutByBorder.length).toBeGreaterThanOrEqual(5);
    for (const pos of cutByBorder) {
      expect(report.positions[pos]!.measured).toBeNull();
      expect(report.positions[pos]!.hiddenBy).toBe('border');
    }
    // every other position is measured: none is missing without a reason
    expect(report.positions.filter((p) => p.verdict === 'missing' && !p.hidden && !p.outOfView).length).toBe(0);
  });
});
