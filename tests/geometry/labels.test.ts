import { describe, expect, it } from 'vitest';
import { columnIndex, columnLetters, parseLabel, positionLabel } from '@/lib/geometry/labels';
import { PRESETS } from '@/lib/geometry/presets';
import { patternToMm } from '@/lib/geometry/units';
import { buildLattice } from '@/lib/geometry/lattice';

describe('labels', () => {
  it('names columns by letters and rows by numbers from the origin', () => {
    expect(positionLabel({ kind: 'threaded-insert' }, 2, 6)).toBe('insert C7');
    expect(columnLetters(0)).toBe('A');
    expect(columnLetters(25)).toBe('Z');
    expect(columnLetters(26)).toBe('AA');
    expect(columnLetters(701)).toBe('ZZ');
    for (const c of [0, 5, 25, 26, 27, 51, 52, 701, 702, 1999]) expect(columnIndex(columnLetters(c))).toBe(c);
    expect(parseLabel('dog B12')).toEqual({ word: 'dog', col: 1, row: 11 });
  });
});

describe('presets', () => {
  it('size every preset to a 1220 × 2440 mm bed in 305 mm strips', () => {
    for (const p of PRESETS) {
      const pat = patternToMm(p.size({ bedWidthMm: 1220, bedHeightMm: 2440, stripWidthMm: 305 }));
      expect(pat.panels?.length).toBe(8);
      for (const f of pat.families) {
        // Every position lies on the bed.
        expect(f.origin.x).toBeGreaterThan(0);
        expect(f.origin.x + (f.count.x - 1) * f.pitch.x).toBeLessThan(1220);
        expect(f.origin.y + (f.count.y - 1) * f.pitch.y).toBeLessThan(2440);
      }
      expect(buildLattice(pat).positions.length).toBeGreaterThan(10);
    }
  });

  it('puts the 3/4 in dogs between the 1/4-20 inserts of the imperial preset', () => {
    const pat = patternToMm(PRESETS.find((p) => p.id === 'in-3-quarter20-dogs')!.size({ bedWidthMm: 1220, bedHeightMm: 1220 }));
    const [ins, dogs] = pat.families;
    expect(ins!.pitch.x).toBeCloseTo(76.2, 9); // 3 in
    expect(dogs!.origin.x - ins!.origin.x).toBeCloseTo(38.1, 9); // half a pitch: between inserts
    expect(dogs!.holeDiameter).toBeCloseTo(0.77 * 25.4, 9);
  });
});
