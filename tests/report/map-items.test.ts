/**
 * The deviation map in its two views, whole bed and hole to hole, from what the measurement core reports on a scene
 * whose lattice is stretched 0.8 mm per metre along X (scaleX 1.0008) with one insert pushed 0.9 mm off. A uniform
 * stretch s moves each position by (s − 1)(x − x̄) along X after the best rigid placement (plain geometry: a
 * scale about the centroid), and an affine placement takes it out entirely; the pushed insert stays off in both.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { presetById } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { MapViewSwitch } from '@/components/report/MapViewSwitch';
import { reportMapItems } from '@/lib/report/map-items';
import { hasFormView, MAP_VIEW_WORD, positionMark, reportCounts, viewCounts, viewMark } from '@/lib/report/words';

const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
const report = ReportSchema.parse(analyzePoints(makeScene({ pattern, seed: 5, scaleX: 1.0008, extraDeviation: new Map([[7, [0.9, 0.2]]]) }).points, pattern));

/** Least-squares slope of dx against nominal x over the measured items (mm per mm). */
function slope(items: { x: number; dx: number | null }[]): number {
  const m = items.filter((i) => i.dx !== null);
  const mx = m.reduce((a, i) => a + i.x, 0) / m.length, my = m.reduce((a, i) => a + i.dx!, 0) / m.length;
  return m.reduce((a, i) => a + (i.x - mx) * (i.dx! - my), 0) / m.reduce((a, i) => a + (i.x - mx) ** 2, 0);
}

describe('the deviation map on the whole bed and hole to hole', () => {
  it("draws the whole bed's deviations with the stretch in them, and hole to hole without it", () => {
    expect(hasFormView(report)).toBe(true);
    const bed = reportMapItems(report, 'bed', 'mm');
    const form = reportMapItems(report, 'form', 'mm');
    // 0.8 mm per metre along X on the whole bed, within 0.05 mm per metre; hole to hole under 0.05 mm per metre
    expect(slope(bed)).toBeCloseTo(0.0008, 4);
    expect(Math.abs(slope(form))).toBeLessThan(0.00005);
    // the pushed insert: 0.9, 0.2 mm off in both views
    expect(form[7]!.dx).toBeCloseTo(0.9, 1);
    expect(form[7]!.dy).toBeCloseTo(0.2, 1);
    expect(form[7]!.mark).toBe('out');
    expect(form[7]!.title).toContain('off hole to hole');
    expect(bed[7]!.title).not.toContain('hole to hole');
  });

  it("marks each position by its form verdict hole to hole, by its rigid verdict on the whole bed, and counts them as the core does", () => {
    const bed = reportMapItems(report, 'bed', 'mm');
    const form = reportMapItems(report, 'form', 'mm');
    report.positions.forEach((p, k) => {
      expect(bed[k]!.mark).toBe(positionMark(p));
      expect(form[k]!.mark).toBe(p.form ? p.form.verdict : positionMark(p));
      expect(viewMark(p, 'form')).toBe(form[k]!.mark);
    });
    // the stretch makes positions near the ends marginal on the whole bed; hole to hole only the pushed insert is off
    const rigid = viewCounts(report, 'bed');
    const hole = viewCounts(report, 'form');
    expect(rigid).toEqual(reportCounts(report));
    expect(rigid.marginal).toBeGreaterThan(10);
    expect(hole.out).toBe(report.summary.formOut);
    expect(hole.marginal).toBe(report.summary.formMarginal);
    expect(hole.marginal).toBe(0);
    // what is neither in nor out is the same in both views
    for (const k of ['measured', 'missing', 'hidden', 'unmatched', 'positions'] as const) expect(hole[k]).toBe(rigid[k]);
    expect(hole.in + hole.marginal + hole.out).toBe(rigid.measured);
  });

  it('offers both views as a switch named as the tables name their columns, the one shown pressed', () => {
    const html = renderToStaticMarkup(createElement(MapViewSwitch, { value: 'form', onChange: () => {} }));
    expect(html).toContain(`aria-pressed="false" title="each position against where the pattern puts it`);
    expect(html).toMatch(new RegExp(`aria-pressed="true"[^>]*data-view="form"[^>]*>${MAP_VIEW_WORD.form}<`));
    expect(html).toContain(`>${MAP_VIEW_WORD.bed}<`);
  });
});
