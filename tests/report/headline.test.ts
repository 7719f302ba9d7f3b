/**
 * The headline in the reader's unit. In mm it is the measurement core's own sentence word for word (the core's
 * lib/geometry/verdict.ts is the reference: scenes from its scene generator, verdicts from analyzePoints); in
 * inches every length is the same length over 25.4 mm (the international inch, exact by definition). Its counts
 * are the cards' counts.
 */
import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { presetById } from '@/lib/geometry/presets';
import { makeScene, type SceneSpec } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';
import { compareReports } from '@/lib/geometry/compare';
import { comparisonHeadline, headline, panelsToReseat, shapeLine } from '@/lib/report/headline';
import { withOutline } from '@/lib/report/map';
import { reportCounts } from '@/lib/report/words';

const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
const plain = presetById('m6-50')!.size({ bedWidthMm: 600, bedHeightMm: 400 });
const scenes: [string, Omit<SceneSpec, 'pattern'>, typeof pattern][] = [
  ['a true bed', { seed: 1, centreNoisePx: 0.05 }, pattern],
  ['panels shifted and one insert pushed off', { seed: 5, panelShiftMm: 0.3, extraDeviation: new Map([[7, [0.9, 0.2]]]) }, pattern],
  ['a third of the holes not found', { seed: 8, missingFraction: 0.3 }, pattern],
  ['panels turned', { seed: 11, panelTurnDeg: 0.05, panelShiftMm: 0.1 }, pattern],
  ['a bed without panels', { seed: 4, missingFraction: 0.05 }, plain],
];

describe('the headline', () => {
  const sentences: string[] = [];
  for (const [name, spec, pat] of scenes) {
    it(`is the core's sentence in mm: ${name}`, () => {
      const stored = analyzePoints(makeScene({ pattern: pat, ...spec }).points, pat);
      const report = withOutline(stored, patternToMm(pat));
      expect(headline(report, 'mm')).toBe(report.summary.sentence);
      expect(shapeLine(report, 'mm')).toBe(report.summary.shapeSentence ?? null);
      // a report stored without its outline: a panel's corners are taken to move as its centre, the least they
      // can move (corners lie in pairs about the centre), so it finds no panel to reseat that the outline does not
      const bare = panelsToReseat(stored), full = panelsToReseat(report);
      expect(bare.every((id) => full.includes(id))).toBe(true);
      if (bare.length === full.length) expect(headline(stored, 'mm')).toBe(report.summary.sentence);
      sentences.push(report.summary.sentence);
    });
  }

  it('covers a pass, a fail, a panel to reseat and too few positions seen among those scenes', () => {
    expect(sentences.some((t) => t.startsWith('Pass:'))).toBe(true);
    expect(sentences.some((t) => t.startsWith('Fail:'))).toBe(true);
    expect(sentences.some((t) => t.includes('should be reseated'))).toBe(true);
    expect(sentences.some((t) => t.includes('positions were not seen'))).toBe(true);
  });

  it('writes every length in inches for an inch reader', () => {
    const report = withOutline(analyzePoints(makeScene({ pattern, seed: 5, panelShiftMm: 0.3, extraDeviation: new Map([[7, [0.9, 0.2]]]) }).points, pattern), patternToMm(pattern));
    const mm = headline(report, 'mm');
    const inch = headline(report, 'in');
    const mmLengths = [...mm.matchAll(/(\d+\.\d+) mm/g)].map((m) => Number(m[1]));
    const inLengths = [...inch.matchAll(/(\d+\.\d+) in\b/g)].map((m) => Number(m[1]));
    expect(mmLengths.length).toBeGreaterThan(0);
    expect(inch).not.toMatch(/\bmm\b/);
    expect(inLengths.length).toBe(mmLengths.length);
    // 0.01 mm shown is 0.0004 in: the inch figures agree with the mm figures to their rounding
    inLengths.forEach((v, k) => expect(Math.abs(v * 25.4 - mmLengths[k]!)).toBeLessThanOrEqual(0.005 + 0.00005 * 25.4 + 1e-9));
    expect(shapeLine(report, 'in')).not.toMatch(/\bmm\b/);
  });

  it("counts as the cards count: positions not seen are those the photo could show", () => {
    const report = analyzePoints(makeScene({ pattern, seed: 8, missingFraction: 0.3 }).points, pattern);
    const c = reportCounts(report);
    const m = headline(report, 'mm').match(/(\d+) of (\d+) positions were not seen/);
    expect(m).not.toBeNull();
    expect(Number(m![1])).toBe(c.missing);
    expect(Number(m![2])).toBe(c.inView);
    // under the reference sheet or outside the photo are counted apart, and all are in the core's "missing"
    expect(c.missing + c.hidden).toBe(report.summary.missing);
    expect(c.hidden).toBe(report.positions.filter((p) => p.hidden || p.outOfView).length);
    expect(c.hidden).toBeGreaterThan(0);
  });

  it("writes the comparison's sentence as the core does in mm, and in inches for an inch reader", () => {
    const before = analyzePoints(makeScene({ pattern, seed: 1, centreNoisePx: 0.05 }).points, pattern);
    const same = analyzePoints(makeScene({ pattern, seed: 2, centreNoisePx: 0.05 }).points, pattern);
    const moved = analyzePoints(makeScene({ pattern, seed: 5, panelShiftMm: 0.3, extraDeviation: new Map([[7, [0.9, 0.2]]]) }).points, pattern);
    for (const after of [same, moved]) {
      const cmp = compareReports(before, after);
      expect(comparisonHeadline(cmp, 'mm')).toBe(cmp.summary.sentence);
      expect(comparisonHeadline(cmp, 'in')).toContain(`largest ${(cmp.summary.maxChangeMm / 25.4).toFixed(4)} in`);
    }
    expect(compareReports(before, moved).summary.significant).toBeGreaterThan(0);
  });
});
