/**
 * The whole bed's sentence (lib/geometry/verdict.ts). Its counts are checked against the positions themselves, its
 * grammar against English subject–verb agreement (one position "is", several "are"; one "was", several "were").
 * Scenes come from the scene generator and are measured by analyzePoints.
 */
import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { presetById } from '@/lib/geometry/presets';
import { makeScene, type SceneSpec } from '@/lib/geometry/synthetic';
import { panelCorrection, verdictSentence } from '@/lib/geometry/verdict';

const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
const measure = (spec: Omit<SceneSpec, 'pattern'>) => analyzePoints(makeScene({ pattern, ...spec }).points, pattern);

describe('the bed sentence', () => {
  it('says "is" for one position out and "are" for several, with the counts of the positions out', () => {
    const one = measure({ seed: 2, extraDeviation: new Map([[7, [0.9, 0.2]]]) });
    const two = measure({ seed: 2, extraDeviation: new Map([[7, [0.9, 0.2]], [30, [-0.2, 1.0]]]) });
    for (const [r, n, verb] of [[one, 1, 'is'], [two, 2, 'are']] as const) {
      const measured = r.positions.filter((p) => p.deviation).length;
      expect(r.positions.filter((p) => p.verdict === 'out').length).toBe(n);
      expect(r.summary.sentence).toContain(`${n} of ${measured} measured positions ${verb} out of tolerance on the bed as a whole`);
      expect(r.summary.sentence).toContain(`${n} of ${measured} measured positions ${verb} out of tolerance hole to hole`);
    }
  });

  it('names the positions too close to call on the whole bed that the figures count, when the verdict is taken hole to hole', () => {
    // a small reference square on a large bed: far positions too close to call on the whole bed (lib/geometry/README.md)
    const r = measure({ seed: 3, centreNoisePx: 0.3, square: { sizeMm: 80, x: 300, y: 300, angleDeg: 4 } });
    const bed = r.positions.filter((p) => p.verdict === 'marginal').length;
    const holeToHole = r.positions.filter((p) => p.form?.verdict === 'marginal').length;
    expect(bed).toBeGreaterThan(1);
    expect(r.summary.marginal).toBe(bed);
    expect(r.summary.sentence).toContain(`${bed} are too close to the tolerance to call on the bed as a whole`);
    if (holeToHole) expect(r.summary.sentence).toContain(`${holeToHole} ${holeToHole === 1 ? 'is' : 'are'} too close to the tolerance to call hole to hole`);
  });

  it('names them in a pass too, which they do not turn marginal', () => {
    const r = measure({ seed: 2 });
    const positions = r.positions.map((p, k) => (k === 5 && p.deviation ? { ...p, verdict: 'marginal' as const } : p));
    expect(positions[5]!.form?.verdict).toBe('in');
    const s = verdictSentence({ verdict: 'pass', positions, shape: r.lattice.shapeCheck, reseat: [], unseen: 0, expected: positions.length });
    expect(s).toMatch(/^Pass: all \d+ measured positions are within tolerance hole to hole \(RMS [\d.]+ mm, worst [\d.]+ mm\); 1 is too close to the tolerance to call on the bed as a whole\.$/);
  });

  it('says "was" for one position not seen and "were" for several', () => {
    const r = measure({ seed: 2 });
    const base = { verdict: 'marginal' as const, positions: r.positions, shape: r.lattice.shapeCheck, reseat: [] };
    expect(verdictSentence({ ...base, unseen: 1, expected: 5 })).toContain('1 of 5 positions was not seen');
    expect(verdictSentence({ ...base, unseen: 2, expected: 5 })).toContain('2 of 5 positions were not seen');
  });

  it('writes a single measured position in the singular', () => {
    const r = measure({ seed: 2 });
    const one = r.positions.filter((p) => p.deviation).slice(0, 1);
    expect(verdictSentence({ verdict: 'pass', positions: one, reseat: [], unseen: 0, expected: 1 })).toMatch(/^Pass: the 1 measured position is within tolerance/);
  });
});

describe('the correcting move of a panel', () => {
  it('writes a move that rounds to nothing without a sign, and the inch figure as the mm one over 25.4', () => {
    // 0.004 mm rounds to 0.00 mm and 0.0002 in to 0.000 in; −0.12 mm is −0.0047 in, 0.005 in to three places
    expect(panelCorrection(-0.004, 0.12, 0)).toMatch(/^move X by 0\.00 mm \(0\.000 in\), Y by −0\.12 mm \(−0\.005 in\), /);
  });
});
