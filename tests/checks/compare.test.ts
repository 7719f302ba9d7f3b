/**
 * Comparison of two checks. "Larger than the uncertainty" follows the GUM (JCGM 100:2008, §6.2–6.3):
 * expanded uncertainty U = k·u_c with k = 2, and for a difference of two independent results
 * u_c = √(u_a² + u_b²) (§5.1.2, law of propagation for a difference).
 */
import { describe, expect, it } from 'vitest';
import { compareReports } from '@/lib/checks/compare';
import { ReportSchema, type Report, type ReportPosition } from '@/lib/geometry/contract';

function pos(col: number, dev: [number, number] | null, u: number | null, panel = 'P1'): ReportPosition {
  return {
    family: 'dog', col, row: 0, label: `dog ${col}`, panel, nominal: { x: col * 96, y: 0 },
    measured: dev ? { x: col * 96 + dev[0], y: dev[1] } : null,
    deviation: dev ? { dx: dev[0], dy: dev[1], r: Math.hypot(dev[0], dev[1]) } : null,
    uncertaintyMm: u, toleranceMm: 0.5, verdict: dev ? 'in' : 'missing',
  };
}

function report(positions: ReportPosition[], panelDx: number): Report {
  return ReportSchema.parse({
    version: 1, units: 'mm', pattern: { name: 't' }, positions, unmatched: [],
    panels: [{ id: 'P1', dx: panelDx, dy: 0, rotationDeg: 0, positions: positions.length, uncertaintyMm: 0.05, correction: 'none' }],
    lattice: { rotationDeg: 0, scaleX: 1, scaleY: 1, squarenessDeg: 0, observed: true, uncertainty: { rotationDeg: 0, scaleX: 0, scaleY: 0, squarenessDeg: 0 } },
    camera: { focalPx: 1000, k1: 0, k2: 0 },
    summary: { matched: positions.length, missing: 0, rmsMm: 0.1, maxMm: 0.3, out: 0, marginal: 0, verdict: 'pass', sentence: 'ok' },
  });
}

describe('comparison of two checks', () => {
  const u = 0.05; // U = 2·√(0.05² + 0.05²) = 0.1414 mm
  const before = report([pos(0, [0.3, 0], u), pos(1, [0.1, 0], u), pos(2, [0, 0], u), pos(3, null, u), pos(4, [0.2, 0], null)], 0.4);
  const after = report([pos(0, [0.05, 0], u), pos(1, [0.2, 0], u), pos(2, [0, 0.3], u), pos(3, [0.1, 0], u), pos(4, [0, 0], u), pos(5, [0, 0], u)], 0.0);
  const c = compareReports(before, after);
  const at = (col: number) => c.positions.find((p) => p.col === col)!;

  it('reports each change as after minus before with the GUM expanded uncertainty', () => {
    expect(at(0).change?.dx).toBeCloseTo(-0.25, 12);
    expect(at(0).expandedUncertaintyMm).toBeCloseTo(2 * Math.hypot(0.05, 0.05), 12);
    expect(at(2).change).toMatchObject({ dx: 0, dy: 0.3 });
  });

  it('marks only changes larger than the expanded uncertainty as significant', () => {
    expect(at(0).significant).toBe(true); // 0.25 > 0.141
    expect(at(1).significant).toBe(false); // 0.10 < 0.141
    expect(at(2).significant).toBe(true); // 0.30 > 0.141
    expect(c.summary).toMatchObject({ improved: 1, worsened: 1, significant: 2 });
  });

  it('cannot decide when a side is unmatched or has no uncertainty', () => {
    expect(at(3)).toMatchObject({ change: null, significant: null });
    expect(at(4)).toMatchObject({ significant: null });
    expect(at(5)).toMatchObject({ before: null, change: null, verdictBefore: null });
    expect(c.summary.common).toBe(5);
  });

  it('gives the panel move with the same rule', () => {
    expect(c.panels).toHaveLength(1);
    expect(c.panels[0]!.change?.dx).toBeCloseTo(-0.4, 12);
    expect(c.panels[0]!.significant).toBe(true);
  });

  it('finds no change between a report and itself', () => {
    const same = compareReports(after, after);
    expect(same.summary.significant).toBe(0);
    expect(same.positions.every((p) => p.change === null || p.change.r === 0)).toBe(true);
  });
});
