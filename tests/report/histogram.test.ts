import { describe, expect, it } from 'vitest';
import { binDeviations, niceStepAtLeast } from '@/lib/report/histogram';

describe('deviation histogram', () => {
  it('picks 1-2-5 steps', () => {
    expect(niceStepAtLeast(0.083)).toBe(0.1);
    expect(niceStepAtLeast(0.11)).toBe(0.2);
    expect(niceStepAtLeast(0.3)).toBeCloseTo(0.5, 12);
    expect(niceStepAtLeast(0.05)).toBeCloseTo(0.05, 12);
  });

  it('bins hand-counted values into [from, to) bins with the top edge in the last bin', () => {
    // top = 1.0 → 1.0 / 12 = 0.083 → width 0.1, 10 bins. By hand:
    // 0.05 → bin 0; 0.1 → bin 1 (edge goes up); 0.15, 0.19 → bin 1; 0.3 → bin 3; 0.95 → bin 9; 1.0 → last bin 9.
    const bins = binDeviations([0.05, 0.1, 0.15, 0.19, 0.3, 0.95, 1.0]);
    expect(bins).toHaveLength(10);
    expect(bins.map((b) => b.count)).toEqual([1, 3, 0, 1, 0, 0, 0, 0, 0, 2]);
    expect(bins[3]).toEqual({ fromMm: 0.3, toMm: 0.4, count: 1 });
    expect(bins.reduce((s, b) => s + b.count, 0)).toBe(7);
  });

  it('extends the bins to cover the tolerance', () => {
    // data up to 0.12, tolerance 0.4 → 0.4 / 8 = 0.05 → width 0.05, 8 bins; 0.12 → bin 2
    const bins = binDeviations([0.01, 0.12], { maxBins: 8, coverMm: 0.4 });
    expect(bins).toHaveLength(8);
    expect(bins[7]!.toMm).toBeCloseTo(0.4, 12);
    expect(bins.map((b) => b.count)).toEqual([1, 0, 1, 0, 0, 0, 0, 0]);
  });

  it('ignores values that are not finite and returns nothing for no data', () => {
    expect(binDeviations([])).toEqual([]);
    expect(binDeviations([Number.NaN, 0.2]).reduce((s, b) => s + b.count, 0)).toBe(1);
  });
});
