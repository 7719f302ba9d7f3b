import { describe, expect, it } from 'vitest';
import { accessoryFit, boardFit, pinExcess, type AccessoryFitInput } from '@/lib/geometry/accessory';
import type { Report } from '@/lib/geometry/contract';
import { mulberry32 } from '@/lib/geometry/random';

const twoPins = (hole2: { x: number; y: number }): AccessoryFitInput => ({
  // Two pins 76.2 mm (3 in) apart, 0.25 mm radial clearance each, placed nominally over holes at 0 and 76.2 mm.
  pins: [{ x: 0, y: 0, clearanceMm: 0.25 }, { x: 76.2, y: 0, clearanceMm: 0.25 }],
  targets: [{ x: 0, y: 0 }, hole2],
  at: { x: 0, y: 0 },
});

/** Brute force: a grid over turn (about the pins' centroid) and shift, then finer grids around the best cell. */
function bruteForce(inp: AccessoryFitInput): number {
  let best = { v: Infinity, th: 0, x: 0, y: 0 };
  const cx = inp.pins.reduce((s, p) => s + p.x, 0) / inp.pins.length, cy = inp.pins.reduce((s, p) => s + p.y, 0) / inp.pins.length;
  const search = (th0: number, dth: number, x0: number, y0: number, d: number, n: number, nt = n) => {
    for (let i = -nt; i <= nt; i++) for (let j = -n; j <= n; j++) for (let k = -n; k <= n; k++) {
      const th = th0 + i * dth;
      // Shift measured from the centroid-preserving placement for this turn.
      const x = x0 + j * d + cx - (Math.cos(th) * cx - Math.sin(th) * cy), y = y0 + k * d + cy - (Math.sin(th) * cx + Math.cos(th) * cy);
      const v = Math.max(...pinExcess(inp, th, x, y));
      if (v < best.v) best = { v, th, x: x0 + j * d, y: y0 + k * d };
    }
  };
  const dth = Math.PI / 180 / 24;
  search(0, dth, 0, 0, 0.02, 30, 24);
  for (let s = 0; s < 5; s++) { const f = 4 ** (s + 1); search(best.th, dth / f, best.x, best.y, 0.02 / f, 6); }
  return best.v;
}

describe('accessory fit', () => {
  it('fits by shifting 0.15 mm when one hole is 0.3 mm off along the line, with 0.10 mm to spare', () => {
    const r = accessoryFit(twoPins({ x: 76.5, y: 0 }));
    expect(r.fits).toBe(true);
    expect(r.marginMm).toBeCloseTo(0.1, 6);
    expect(Math.abs(r.placement.dx)).toBeCloseTo(0.15, 6);
    expect(r.binding).toEqual([0, 1]);
  });

  it('fits by a small turn when the hole is 0.3 mm off across the line, margin ≈ 0.25 mm', () => {
    const r = accessoryFit(twoPins({ x: 76.2, y: 0.3 }));
    expect(r.fits).toBe(true);
    expect(r.marginMm).toBeGreaterThan(0.249);
    expect(r.marginMm).toBeLessThanOrEqual(0.25);
    expect(r.placement.rotationDeg).toBeCloseTo((Math.atan2(0.3, 76.2) * 180) / Math.PI, 3);
  });

  it('binds by 0.05 mm when the hole is 0.6 mm off along the line', () => {
    const r = accessoryFit(twoPins({ x: 76.8, y: 0 }));
    expect(r.fits).toBe(false);
    expect(r.marginMm).toBeCloseTo(-0.05, 6);
  });

  it('turns the accessory a quarter for a 90° placement', () => {
    const r = accessoryFit({ ...twoPins({ x: 0, y: 76.2 }), turnDeg: 90 });
    expect(r.marginMm).toBeCloseTo(0.25, 6);
  });

  it('finds the same best placement as a brute-force search on random accessories', () => {
    const rand = mulberry32(42);
    for (let trial = 0; trial < 4; trial++) {
      const pins = Array.from({ length: 3 + (trial % 2) }, () => ({ x: Math.round(rand() * 4) * 50, y: Math.round(rand() * 3) * 50, clearanceMm: 0.1 + 0.3 * rand() }));
      const targets = pins.map((p) => ({ x: p.x + (rand() - 0.5) * 0.8, y: p.y + (rand() - 0.5) * 0.8 }));
      const inp = { pins, targets, at: { x: 0, y: 0 } };
      const r = accessoryFit(inp);
      const brute = bruteForce(inp);
      expect(-r.marginMm).toBeLessThanOrEqual(brute + 1e-7);
      expect(-r.marginMm).toBeGreaterThan(brute - 1e-3);
    }
  });
});

describe('sacrificial board fit', () => {
  const pos = (label: string, x: number, y: number, tol: number) => ({ family: 'h', col: 0, row: 0, label, panel: null, nominal: { x, y }, measured: { x, y }, deviation: { dx: 0, dy: 0, r: 0 }, uncertaintyMm: 0.01, toleranceMm: tol, verdict: 'in' as const });
  const report = (ps: ReturnType<typeof pos>[]) => ({ positions: ps }) as unknown as Report;
  it('is the accessory computation against the bed: a board shifted as a whole still fits, one stray hole binds', () => {
    const bed = report([pos('A1', 0, 0, 0.2), pos('B1', 50, 0, 0.2), pos('A2', 0, 50, 0.2), pos('B2', 50, 50, 0.2)]);
    const shifted = report([pos('A1', 0.4, 0.1, 0.2), pos('B1', 50.4, 0.1, 0.2), pos('A2', 0.4, 50.1, 0.2), pos('B2', 50.4, 50.1, 0.2)]);
    const a = boardFit(shifted, bed);
    expect(a.fits).toBe(true);
    expect(a.marginMm).toBeCloseTo(0.2, 5);
    // B2 drilled 0.6 mm off: the best placement splits the error; it binds.
    const stray = report([pos('A1', 0, 0, 0.2), pos('B1', 50, 0, 0.2), pos('A2', 0, 50, 0.2), pos('B2', 50.6, 50, 0.2), pos('C9', 9, 9, 0.2)]);
    const b = boardFit(stray, bed);
    expect(b.fits).toBe(false);
    expect(b.unpaired).toEqual(['C9']);
    expect(b.pins.find((p) => p.label === 'B2')!.binding).toBe(true);
  });
});
