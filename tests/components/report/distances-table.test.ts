import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { DistancesTable } from '@/components/report/DistancesTable';
import { analyzePoints } from '@/lib/geometry/analyze';
import { buildLattice } from '@/lib/geometry/lattice';
import { PRESETS } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';

describe("the report's measured distances", () => {
  it('shows what was given with its residual after the fit, and why a distance was not used', () => {
    const pattern = PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 800, bedHeightMm: 600, stripWidthMm: 200 });
    const sc = makeScene({ pattern, seed: 2, centreNoisePx: 0.05, cornerNoisePx: 0.05, missingFraction: 0.05 });
    const lat = buildLattice(patternToMm(pattern));
    const seen = lat.positions.map((q, i) => ({ q, i })).filter(({ i }) => sc.truth.seen[i]);
    const a = seen[0]!, b = seen[seen.length - 1]!;
    const t = sc.truth.trueXY;
    const unseen = lat.positions.findIndex((_, i) => !sc.truth.seen[i]);
    const report = analyzePoints(sc.points, pattern, { distances: [
      { from: a.q.label, to: b.q.label, mm: Math.hypot(t[2 * b.i]! - t[2 * a.i]!, t[2 * b.i + 1]! - t[2 * a.i + 1]!), sigmaMm: 0.2 },
      { from: a.q.label, to: lat.positions[unseen]!.label, mm: 300, sigmaMm: 0.2 },
    ] });
    const html = renderToStaticMarkup(createElement(DistancesTable, { report, unit: 'mm' }));
    expect(html).toContain(a.q.label);
    expect(html).toContain(`${report.distances![0]!.mm.toFixed(2)}`);
    expect(html).toMatch(/\(\d\.\dσ\)/);
    expect(html).toContain('not used:');
    expect(html).toContain('was not seen in the photo');
    // No distances given: nothing shown.
    expect(renderToStaticMarkup(createElement(DistancesTable, { report: { ...report, distances: undefined }, unit: 'mm' }))).toBe('');
  });
});
