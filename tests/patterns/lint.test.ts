import { describe, expect, it } from 'vitest';
import { PatternSchema, type Pattern } from '@/lib/geometry/contract';
import { PRESETS } from '@/lib/geometry/presets';
import { holeKey, lintPattern } from '@/lib/patterns/lint';
import { convertPattern } from '@/lib/patterns/units';

const base = (over: Partial<Pattern> = {}): Pattern =>
  PatternSchema.parse({
    version: 1,
    name: 'test bed',
    units: 'mm',
    bed: { width: 600, height: 400 },
    families: [{ id: 'inserts', kind: 'threaded-insert', holeDiameter: 6, origin: { x: 25, y: 25 }, pitch: { x: 50, y: 50 }, count: { x: 12, y: 8 }, fit: { fastener: 'M6', clearance: 'medium' } }],
    ...over,
  });

const codes = (p: Pattern) => lintPattern(p).findings.map((f) => f.code);

describe('lintPattern', () => {
  it('finds nothing wrong in the presets sized to common bed sizes in one piece', () => {
    // Common practice: 4 × 8 ft sheet beds (1220 × 2440 mm) and 600 × 900 mm hobby beds.
    for (const preset of PRESETS)
      for (const size of [{ bedWidthMm: 1220, bedHeightMm: 2440 }, { bedWidthMm: 600, bedHeightMm: 900 }]) {
        const r = lintPattern(preset.size(size));
        expect(r.mistakes, `${preset.id} ${JSON.stringify(size)}: ${r.findings.map((f) => f.message).join('; ')}`).toBe(0);
      }
  });

  it('finds the holes that strips of the wrong width put on a seam', () => {
    // M6 on 50 mm, 2440 mm long: rows at 20 + 50k mm; 200 mm strips put seams at 200k mm, 20 mm or more from
    // every row (clean). A 96 mm grid on 900 mm has rows at 66 + 96k mm; 150 mm strips put a seam at 450 mm,
    // right under the row at 450 mm (20 mm dog holes straddle it).
    expect(lintPattern(PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 1220, bedHeightMm: 2440, stripWidthMm: 200 })).mistakes).toBe(0);
    const r = lintPattern(PRESETS.find((p) => p.id === 'g96-d20')!.size({ bedWidthMm: 600, bedHeightMm: 900, stripWidthMm: 150 }));
    const onSeam = r.findings.filter((f) => f.code === 'hole-panel-edge');
    expect(onSeam.length).toBeGreaterThan(0);
    expect(onSeam.some((f) => Math.abs(f.atMm.y - 450) < 1e-9 && Math.abs(f.overlapMm! - 10) < 1e-9)).toBe(true);
  });

  it('flags a family whose pitch is smaller than its holes, once, with every hole flagged', () => {
    // Two circles of diameter d with centres a pitch s apart overlap when s < d (elementary geometry).
    const p = base({ families: [{ ...base().families[0]!, holeDiameter: 20, pitch: { x: 18, y: 50 }, count: { x: 4, y: 2 } }] });
    const r = lintPattern(p);
    const f = r.findings.filter((x) => x.code === 'family-self-overlap');
    expect(f).toHaveLength(1);
    expect(f[0]!.overlapMm).toBeCloseTo(2, 9);
    expect(f[0]!.holes.map((h) => h.label)).toEqual(['insert A1', 'insert B1']);
    expect(r.flagged.size).toBe(8);
  });

  it('counts holes that only touch as clear', () => {
    // Circles of diameter d whose centres are exactly d apart touch at one point and do not overlap.
    const p = base({ families: [{ ...base().families[0]!, holeDiameter: 10, pitch: { x: 10, y: 10 }, count: { x: 3, y: 3 } }] });
    expect(codes(p)).not.toContain('family-self-overlap');
  });

  it('measures the overlap of two families by the sum of radii less the centre distance', () => {
    // Inserts (6 mm) at (25, 25) and a 20 mm dog hole at (35, 25): 3 + 10 − 10 = 3 mm of overlap.
    const dogs = { id: 'dogs', kind: 'dog-hole' as const, holeDiameter: 20, origin: { x: 35, y: 25 }, pitch: { x: 100, y: 100 }, count: { x: 1, y: 1 }, fit: { pinDiameter: 19.9 } };
    const r = lintPattern(base({ families: [base().families[0]!, dogs] }));
    const hits = r.findings.filter((f) => f.code === 'hole-overlap');
    // The dog at (35, 25) reaches 10 mm: it touches insert A1 (10 mm away) by 3 mm, and insert B1 at
    // (75, 25) is 40 mm away (clear); A2 at (25, 75) is √(10² + 50²) ≈ 51 mm away (clear).
    expect(hits).toHaveLength(1);
    expect(hits[0]!.overlapMm).toBeCloseTo(3, 9);
    expect(hits[0]!.holes.map((h) => h.label).sort()).toEqual(['dog A1', 'insert A1']);
    expect(r.flagged.has(holeKey(1, 0, 0))).toBe(true);
    expect(r.flagged.has(holeKey(0, 0, 0))).toBe(true);
    expect(r.flagged.has(holeKey(0, 1, 0))).toBe(false);
  });

  it('flags holes that break through the bed edge or lie off the bed', () => {
    // First column 2 mm from the left edge with a 6 mm hole (radius 3): 1 mm of the hole is past the edge.
    const p = base({ families: [{ ...base().families[0]!, origin: { x: 2, y: 25 }, count: { x: 1, y: 2 } }] });
    const r = lintPattern(p);
    const edge = r.findings.filter((f) => f.code === 'hole-bed-edge');
    expect(edge).toHaveLength(2);
    expect(edge[0]!.overlapMm).toBeCloseTo(1, 9);
    const off = lintPattern(base({ families: [{ ...base().families[0]!, origin: { x: -10, y: 25 }, count: { x: 1, y: 1 } }] }));
    expect(off.findings[0]!.message).toMatch(/off the bed/);
  });

  it('tells a hole cutting into a channel from one the channel removes', () => {
    // A 20 mm wide channel from y = 60 to 80: row 2 (y = 75) has its centre inside → left out (notice);
    // a channel from y = 77 to 97 leaves row 2's centre 2 mm outside with a 3 mm radius → 1 mm into it.
    const inside = lintPattern(base({ channels: [{ x: 0, y: 60, width: 600, height: 20 }] }));
    expect(inside.mistakes).toBe(0);
    expect(inside.notices).toBe(12);
    const rim = lintPattern(base({ channels: [{ x: 0, y: 77, width: 600, height: 20 }] }));
    const cut = rim.findings.filter((f) => f.code === 'hole-channel');
    expect(cut).toHaveLength(12);
    expect(cut[0]!.overlapMm).toBeCloseTo(1, 9);
  });

  it('flags a hole on a seam between two panels and one on no panel', () => {
    // Seam at y = 74: row 2 (y = 75) is 1 mm from the seam with a 3 mm radius.
    const seam = lintPattern(base({ panels: [{ id: 'P1', x: 0, y: 0, width: 600, height: 74 }, { id: 'P2', x: 0, y: 74, width: 600, height: 326 }] }));
    const hits = seam.findings.filter((f) => f.code === 'hole-panel-edge');
    expect(hits).toHaveLength(12);
    expect(hits[0]!.overlapMm).toBeCloseTo(2, 9);
    const gap = lintPattern(base({ panels: [{ id: 'P1', x: 0, y: 0, width: 600, height: 200 }] }));
    expect(gap.findings.filter((f) => f.code === 'hole-off-panels')).toHaveLength(4 * 12);
  });

  it('flags panels that overlap or leave the bed, and fits that cannot hold', () => {
    const r = lintPattern(
      base({
        panels: [{ id: 'A', x: 0, y: 0, width: 600, height: 210 }, { id: 'B', x: 0, y: 200, width: 600, height: 210 }],
        families: [{ ...base().families[0]!, count: { x: 1, y: 1 }, fit: { pinDiameter: 6.2 } }],
      }),
    );
    expect(r.findings.map((f) => f.code).sort()).toEqual(['fit', 'panel-off-bed', 'panel-overlap']);
    const unknown = lintPattern(base({ families: [{ ...base().families[0]!, count: { x: 1, y: 1 }, fit: { fastener: 'M7', clearance: 'medium' } }] }));
    expect(unknown.findings[0]!.code).toBe('fit');
  });

  it('gives the same findings for a pattern in inches as for the same pattern in mm', () => {
    // 25.4 mm per inch exactly (international yard and pound agreement, 1959).
    const p = base({ channels: [{ x: 0, y: 77, width: 600, height: 20 }], families: [{ ...base().families[0]!, origin: { x: 2, y: 25 } }] });
    const inch = convertPattern(p, 'in');
    expect(inch.bed.width).toBeCloseTo(600 / 25.4, 6);
    const a = lintPattern(p), b = lintPattern(inch);
    expect(b.findings.map((f) => [f.code, f.holes.map((h) => h.label)])).toEqual(a.findings.map((f) => [f.code, f.holes.map((h) => h.label)]));
    expect(b.findings[0]!.message).toMatch(/ in\b/);
    expect(convertPattern(inch, 'mm')).toEqual(p);
  });

  it('lists at most the limit per code but counts and flags all', () => {
    const p = base({ channels: [{ x: 0, y: 77, width: 600, height: 20 }] });
    const r = lintPattern(p, { limit: 5 });
    expect(r.findings).toHaveLength(5);
    expect(r.mistakes).toBe(12);
    expect(r.omitted['hole-channel']).toBe(7);
    expect(r.flagged.size).toBe(12);
  });
});
