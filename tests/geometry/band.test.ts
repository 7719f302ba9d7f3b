import { describe, expect, it } from 'vitest';
import { BAND_COVERAGE, BAND_K, bandRadiusMm, beyondBand, combinedSigmaMm } from '@/lib/geometry/band';
import { compareReports } from '@/lib/geometry/compare';
import { positionVerdict } from '@/lib/geometry/verdict';
import { mulberry32, normalFrom } from '@/lib/geometry/random';
import type { Report } from '@/lib/geometry/contract';

/** P(|e| ≤ kσ) for an isotropic 2-D normal, by integrating its density over a square grid (midpoint rule). */
function discProbability(k: number, steps = 1200): number {
  const h = (2 * k) / steps;
  let p = 0;
  for (let i = 0; i < steps; i++) {
    const x = -k + (i + 0.5) * h;
    for (let j = 0; j < steps; j++) {
      const y = -k + (j + 0.5) * h;
      if (x * x + y * y <= k * k) p += Math.exp(-(x * x + y * y) / 2) / (2 * Math.PI);
    }
  }
  return p * h * h;
}

describe('the 95 % uncertainty band of a 2-D position', () => {
  it('has the radius of the chi-square 95 % quantile with 2 degrees of freedom, √5.991 = 2.4477', () => {
    // Published table value: χ²(0.95; 2 dof) = 5.991 (NIST/SEMATECH e-Handbook of Statistical Methods,
    // section 1.3.6.7.4, upper critical values of the chi-square distribution; value from memory).
    expect(BAND_COVERAGE).toBe(0.95);
    expect(BAND_K).toBeCloseTo(Math.sqrt(5.991), 3);
    expect(BAND_K).toBeCloseTo(2.4477, 4);
  });

  it('covers 95 % of a 2-D normal error, by numerical integration of the density over the disc', () => {
    // Independent of the closed form: a grid integral of the bivariate normal density (textbook definition).
    expect(discProbability(BAND_K)).toBeCloseTo(0.95, 3);
    // The per-axis 1.96 σ of a 1-D normal, drawn as a radius, covers only about 85 %.
    expect(discProbability(1.959964)).toBeCloseTo(1 - Math.exp(-(1.959964 ** 2) / 2), 3);
    expect(discProbability(1.959964)).toBeLessThan(0.86);
  });

  it('contains 95 % of seeded 2-D normal errors of any σ', () => {
    const g = normalFrom(mulberry32(13));
    for (const sigma of [0.01, 0.05, 0.2]) {
      const n = 40000;
      let inside = 0;
      for (let i = 0; i < n; i++) if (!beyondBand(Math.hypot(sigma * g(), sigma * g()), sigma)) inside++;
      // Binomial standard error at n = 40000: √(0.95·0.05/n) ≈ 0.0011; allow 4 of them.
      expect(Math.abs(inside / n - 0.95)).toBeLessThan(0.0045);
    }
  });

  it('calls a position that truly sits on the tolerance circle in-tolerance at most 5 % of the time', () => {
    // A false pass needs the measured point at least kσ inside the true one: P ≤ exp(−k²/2) = 5 % (Rayleigh law).
    const g = normalFrom(mulberry32(21));
    const tol = 0.3, sigma = 0.04, n = 20000;
    let falsePass = 0;
    for (let i = 0; i < n; i++) {
      const x = tol + sigma * g(), y = sigma * g();
      if (positionVerdict(Math.hypot(x, y), sigma, tol) === 'in') falsePass++;
    }
    expect(falsePass / n).toBeLessThan(0.05);
  });

  it('is the same band for a verdict and for a comparison of two checks', () => {
    const sigma = 0.05, tol = 1;
    const edge = tol - bandRadiusMm(sigma);
    expect(positionVerdict(edge - 1e-9, sigma, tol)).toBe('in');
    expect(positionVerdict(edge + 1e-6, sigma, tol)).toBe('marginal');
    const pos = (x: number): Report['positions'][number] => ({ family: 'f', col: 0, row: 0, label: 'A1', panel: null, nominal: { x: 0, y: 0 }, measured: { x, y: 0 }, deviation: { dx: x, dy: 0, r: Math.abs(x) }, uncertaintyMm: sigma, toleranceMm: tol, verdict: 'in' });
    const report = (x: number) => ({ positions: [pos(x)], panels: [] }) as unknown as Report;
    // Two independent measurements: σ of the difference is √2 σ (sum of variances).
    const band = bandRadiusMm(combinedSigmaMm(sigma, sigma));
    expect(band).toBeCloseTo(BAND_K * Math.SQRT2 * sigma, 12);
    expect(compareReports(report(0), report(band * 0.999)).positions[0]!.significant).toBe(false);
    expect(compareReports(report(0), report(band * 1.001)).positions[0]!.significant).toBe(true);
  });
});
