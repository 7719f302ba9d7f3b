import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { PRESETS } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';

const m6 = PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 1200, bedHeightMm: 1000, stripWidthMm: 250 });

describe('the emitted report is exactly the contract', () => {
  // The contract (lib/geometry/contract.ts) strips any field it does not list, so a report equal to its own parse
  // holds no unlisted field and lacks no listed one.
  it('lists every field analyzePoints emits, camera and diagnostics included', () => {
    const scene = makeScene({ pattern: m6, seed: 2, tiltDeg: 8, k1: -0.04, centreNoisePx: 0.08, cornerNoisePx: 0.1, missingFraction: 0.03, spuriousFraction: 0.03 });
    const r = analyzePoints(scene.points, m6);
    expect(ReportSchema.parse(r)).toEqual(r);
    expect(r.camera.tiltDeg).toBeDefined();
    expect(r.diagnostics?.inFit).toBeGreaterThan(0);
  });

  it('lists the fields of a report whose lattice shape is not observed', () => {
    const scene = makeScene({ pattern: m6, seed: 4, tiltDeg: 10, centreNoisePx: 0.08, cornerNoisePx: 0.3, square: { sizeMm: 12, x: 300, y: 300, angleDeg: 3 } });
    const r = analyzePoints(scene.points, m6);
    expect(r.lattice.observed).toBe(false);
    expect(ReportSchema.parse(r)).toEqual(r);
  });

  it('still reads a stored report written before camera and diagnostics were listed, and drops unknown fields', () => {
    const scene = makeScene({ pattern: m6, seed: 3, centreNoisePx: 0.08 });
    const { diagnostics: _d, ...rest } = analyzePoints(scene.points, m6);
    const stored = JSON.parse(JSON.stringify({ ...rest, camera: { focalPx: rest.camera.focalPx, k1: rest.camera.k1, k2: rest.camera.k2 }, extra: { note: 'later field' } })) as Record<string, unknown>;
    const parsed = ReportSchema.parse(stored);
    expect(parsed.positions).toHaveLength(rest.positions.length);
    expect(parsed.diagnostics).toBeUndefined();
    expect('extra' in parsed).toBe(false);
  });
});
