/**
 * Bounded input, bounded work: the pattern and points contracts refuse non-finite and physically impossible
 * numbers with the field and its range, and analyzePoints, given anything, throws only GeometryInputError.
 * Ranges are facts of the trade (common practice): beds up to 10 m, holes 1–100 mm, pitches 5–2000 mm.
 * Property tests use fast-check with a fixed seed (printed), a bounded number of runs, and no clocks.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzePoints, GeometryInputError, makeScene, PatternSchema, PointsSchema, type Pattern } from '@/lib/geometry';

const SEED = 20261202;
console.log(`fast-check seed ${SEED}`);

const BED: Pattern = {
  version: 1, name: 'dog bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
};
const scene = makeScene({ pattern: BED, seed: 3 });

const withFamily = (over: Partial<Pattern['families'][number]>): Pattern => ({ ...BED, families: [{ ...BED.families[0]!, ...over }] });

describe('the pattern contract', () => {
  it('refuses a family origin of ±1e308 mm, naming the field and the bed', () => {
    const r = PatternSchema.safeParse(withFamily({ origin: { x: -1e308, y: 1e308 } }));
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join('.'));
    expect(paths).toContain('families.0.origin.x');
    expect(r.error!.issues[0]!.message).toMatch(/origin\.x must lie on the bed \(0 to 960 mm\)/);
  });

  it('refuses a 1e308 mm hole and a 0.001 mm pitch with their ranges (common practice: 1–100 mm, 5–2000 mm)', () => {
    const hole = PatternSchema.safeParse(withFamily({ holeDiameter: 1e308 }));
    expect(hole.error!.issues[0]!.message).toBe('holeDiameter must be between 1 and 100 mm (got 1e+308)');
    const pitch = PatternSchema.safeParse(withFamily({ pitch: { x: 0.001, y: 96 } }));
    expect(pitch.error!.issues[0]!.path.join('.')).toBe('families.0.pitch.x');
    expect(pitch.error!.issues[0]!.message).toMatch(/between 5 and 2000 mm/);
  });

  it('holds a pattern in inches to the same lengths (10 m is 393.7 in)', () => {
    const r = PatternSchema.safeParse({ ...BED, units: 'in', bed: { width: 400, height: 100 }, families: [{ ...BED.families[0]!, holeDiameter: 0.75, pitch: { x: 6, y: 6 }, origin: { x: 3, y: 3 } }] });
    expect(r.error!.issues[0]!.message).toBe('bed.width must be between 0.3937 and 393.7 in (got 400)');
  });

  it('only ever answers a random pattern with zod issues, never an exception', () => {
    const num = fc.oneof(fc.double(), fc.constantFrom(0, -0, 1e-320, 1e308, -1e308, Number.NaN, Infinity), fc.integer({ min: -5000, max: 5000 }));
    const family = fc.record({ id: fc.constantFrom('a', 'b'), kind: fc.constantFrom('dog-hole', 'other'), holeDiameter: num, origin: fc.record({ x: num, y: num }), pitch: fc.record({ x: num, y: num }), count: fc.record({ x: num, y: num }), fit: fc.oneof(fc.record({ toleranceMm: num }), fc.record({ pinDiameter: num })) });
    const pattern = fc.record({ version: fc.constant(1), name: fc.constant('p'), units: fc.constantFrom('mm', 'in'), bed: fc.record({ width: num, height: num }), families: fc.array(family, { minLength: 1, maxLength: 3 }), panels: fc.option(fc.array(fc.record({ id: fc.constant('P'), x: num, y: num, width: num, height: num }), { maxLength: 3 }), { nil: undefined }) });
    fc.assert(fc.property(fc.oneof(pattern, fc.anything()), (p) => { PatternSchema.safeParse(p); }), { seed: SEED, numRuns: 1500 });
  });
});

describe('analyzePoints', () => {
  it('throws only GeometryInputError for random, extreme and non-finite points and patterns', () => {
    const num = fc.oneof(fc.double({ min: -1e6, max: 1e6 }), fc.constantFrom(0, 1e-320, 1e308, -1e308, Number.NaN, Infinity), fc.double({ min: 0, max: 4000, noNaN: true }));
    const pt = fc.tuple(num, num);
    const points = fc.record({
      image: fc.record({ width: fc.oneof(fc.constant(scene.points.image.width), fc.integer({ min: -10, max: 70000 })), height: fc.oneof(fc.constant(scene.points.image.height), fc.integer({ min: -10, max: 70000 })) }),
      reference: fc.record({ sizeMm: fc.oneof(fc.constant(150), num), corners: fc.oneof(fc.constant(scene.points.reference.corners), fc.tuple(pt, pt, pt, pt)) }),
      holes: fc.oneof(fc.constant(scene.points.holes), fc.array(fc.record({ x: num, y: num, diameterPx: num }), { maxLength: 60 }), fc.constant(scene.points.holes.map((h, i) => (i % 7 ? h : { ...h, x: h.x * 1e-9 })))),
    });
    const pattern = fc.oneof(fc.constant(BED), fc.record({ origin: fc.record({ x: num, y: num }), pitch: fc.record({ x: num, y: num }), holeDiameter: num }).map((o) => withFamily(o)));
    fc.assert(fc.property(points, pattern, (p, q) => {
      try { analyzePoints(p as never, q); } catch (e) { if (!(e instanceof GeometryInputError)) throw e; }
    }), { seed: SEED, numRuns: 300 });
  });

  it('refuses points off the photo before any work', () => {
    const off = { ...scene.points, holes: [...scene.points.holes, { x: -1e308, y: 5, diameterPx: 10 }] };
    expect(PointsSchema.safeParse(off).error!.issues[0]!.message).toMatch(/must lie on the .* px photo/);
  });
});
