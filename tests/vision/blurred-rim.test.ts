/**
 * The blurred-disc model of a hole's radial profile (lib/vision/blurred-rim.ts) against closed forms: at the
 * disc's centre the share inside is the Rayleigh distribution's CDF at r, 1 − exp(−r²/2σ²); far from the centre of
 * a large disc the rim is a straight edge, whose share inside is the normal CDF Φ((r − ρ)/σ) (both from memory).
 */
import { describe, expect, it } from 'vitest';
import { discBlurShare, fitBlurredRim } from '@/lib/vision/blurred-rim';

const phi = (z: number) => {
  // Φ by the Abramowitz & Stegun 7.1.26 erf (|error| < 1.5·10⁻⁷; from memory)
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const erf = 1 - t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429)))) * Math.exp(-x * x);
  return z >= 0 ? (1 + erf) / 2 : (1 - erf) / 2;
};

describe('blurred rim', () => {
  it('gives the Rayleigh CDF at the centre of a blurred disc', () => {
    for (const [r, s] of [[7, 3], [7, 4], [10, 1], [3, 2]] as const) expect(Math.abs(discBlurShare(0, r, s) - (1 - Math.exp(-(r * r) / (2 * s * s))))).toBeLessThan(1e-4);
  });

  it('gives a straight edge\'s normal CDF across the rim of a large disc', () => {
    // r = 2000σ: the rim's curvature is negligible over a few σ
    for (const u of [-2, -1, 0, 0.5, 1.5]) expect(Math.abs(discBlurShare(2000 + u, 2000, 1) - phi(-u))).toBeLessThan(2e-3);
  });

  it('recovers the radius and blur of a profile drawn from the model, to 2 %', () => {
    for (const [r, s] of [[7, 3], [7, 4], [17, 3.5]] as const) {
      const profile = Array.from({ length: Math.ceil((1.3 * r + 10) / 0.5) + 1 }, (_, i) => 0.32 - 0.27 * discBlurShare(i * 0.5, r, s));
      const f = fitBlurredRim(profile, 0.5, r * 1.1);
      expect(Math.abs(f!.rPx / r - 1)).toBeLessThan(0.02);
      expect(Math.abs(f!.sigmaPx / s - 1)).toBeLessThan(0.05);
    }
  });
});
