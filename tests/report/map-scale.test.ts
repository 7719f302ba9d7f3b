import { describe, expect, it } from 'vitest';
import { autoExaggeration, quantile } from '@/lib/report/map-scale';

describe('deviation map scale', () => {
  // Hyndman & Fan (1996) type 7 (the default of R and NumPy): h = (n − 1) q, interpolate between neighbours.
  it('takes quantiles as Hyndman & Fan type 7', () => {
    expect(quantile([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantile([10, 0, 5], 0.9)).toBeCloseTo(9, 12); // sorted 0 5 10, h = 1.8 → 5 + 0.8 × 5
    expect(Number.isNaN(quantile([], 0.5))).toBe(true);
  });

  it('makes the typical arrow about 70 % of the spacing on a 1-2-5 step', () => {
    // ten deviations of 0.2 mm on a 50 mm pitch: 0.7 × 50 / 0.2 = 175 → 100
    expect(autoExaggeration(Array(10).fill(0.2), 50)).toBe(100);
  });

  it('does not let one wild position shrink the others, but keeps it within three spacings', () => {
    const devs = [...Array(99).fill(0.1), 3];
    // typical 0.1 → 0.7 × 50 / 0.1 = 350 → 200; 3 mm × 200 = 600 > 150, step down to 50 (3 × 50 = 150)
    expect(autoExaggeration(devs, 50)).toBe(50);
  });
});
