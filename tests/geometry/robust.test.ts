import { describe, expect, it } from 'vitest';
import { huberWeight, madSigma, median, tukeyWeight } from '@/lib/geometry/robust';
import { mulberry32, normalFrom } from '@/lib/geometry/random';

describe('robust statistics', () => {
  it('takes the median by selection exactly as by sorting, duplicates included', () => {
    const r = mulberry32(9);
    for (let t = 0; t < 500; t++) {
      const n = 1 + Math.floor(r() * 40);
      const a = Array.from({ length: n }, () => Math.floor(r() * 8));
      const s = [...a].sort((x, y) => x - y);
      expect(median(a)).toBe(n % 2 ? s[(n - 1) / 2] : (s[n / 2 - 1]! + s[n / 2]!) / 2);
    }
  });

  it('estimates σ of normal residuals from the MAD (1.4826 · median|r|) despite 10 % gross outliers', () => {
    const g = normalFrom(mulberry32(4));
    const r = Array.from({ length: 20000 }, (_, i) => (i % 10 === 0 ? 50 : 0.3 * g()));
    expect(madSigma(r)).toBeGreaterThan(0.3 * 0.95);
    expect(madSigma(r)).toBeLessThan(0.3 * 1.25);
  });

  it('weights residuals as Huber and Tukey define them', () => {
    expect(huberWeight(0.5, 1)).toBe(1);
    expect(huberWeight(4, 1)).toBe(0.25);
    expect(tukeyWeight(0, 2)).toBe(1);
    expect(tukeyWeight(1, 2)).toBeCloseTo(0.5625, 12);
    expect(tukeyWeight(3, 2)).toBe(0);
  });
});
