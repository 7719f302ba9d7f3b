import { describe, expect, it } from 'vitest';
import { clearanceHoleMm, iso286PinFit, radialToleranceMm } from '@/lib/geometry/fits';
import { MM_PER_IN } from '@/lib/geometry/contract';

describe('fit tables', () => {
  it('holds the ISO 273 M6 row: fine 6.4, medium 6.6, coarse 7.0 mm', () => {
    // Source: ISO 273, clearance holes for bolts and screws, M6 row.
    expect(clearanceHoleMm('M6', 'fine')).toBe(6.4);
    expect(clearanceHoleMm('M6', 'medium')).toBe(6.6);
    expect(clearanceHoleMm('M6', 'coarse')).toBe(7.0);
    expect(radialToleranceMm({ fastener: 'M6', clearance: 'medium' }, 6)).toBeCloseTo(0.3, 12);
  });

  it('holds the ASME B18.2.8 1/4 in row: close 0.266, normal 0.281, loose 0.297 in', () => {
    // Source: ASME B18.2.8, clearance holes for bolts and screws, 1/4 in row.
    expect(clearanceHoleMm('1/4-20', 'close') / MM_PER_IN).toBeCloseTo(0.266, 9);
    expect(clearanceHoleMm('1/4-20', 'normal') / MM_PER_IN).toBeCloseTo(0.281, 9);
    expect(clearanceHoleMm('1/4-20', 'loose') / MM_PER_IN).toBeCloseTo(0.297, 9);
    expect(radialToleranceMm({ fastener: '1/4-20', clearance: 'normal' }, 6.35) / MM_PER_IN).toBeCloseTo(0.0155, 9);
  });

  it('gives a 0.750 in dog in a 0.770 in hole 0.010 in radial play', () => {
    // Common practice: 3/4 in dogs in 0.770 in holes.
    expect(radialToleranceMm({ pinDiameter: 0.75 * MM_PER_IN }, 0.77 * MM_PER_IN) / MM_PER_IN).toBeCloseTo(0.01, 12);
  });

  it('derives an H7/g6 pin fit at 20 mm from ISO 286-2', () => {
    // Source: ISO 286-2, 18–30 mm: H7 +0/+21 µm, g6 −7/−20 µm → diametral clearance 7…41 µm.
    const f = iso286PinFit('H7', 'g6', 20);
    expect(f.minRadialMm).toBeCloseTo(0.0035, 12);
    expect(f.maxRadialMm).toBeCloseTo(0.0205, 12);
  });

  it('refuses an unknown fastener or a class that does not apply to it', () => {
    expect(() => clearanceHoleMm('M7', 'fine')).toThrow(/unknown fastener/);
    expect(() => clearanceHoleMm('M6', 'loose')).toThrow(/does not apply/);
    expect(() => radialToleranceMm({ pinDiameter: 20 }, 19.9)).toThrow(/does not clear/);
  });
});
