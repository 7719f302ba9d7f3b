import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { analyzePoints } from '@/lib/geometry/analyze';
import { PRESETS } from '@/lib/geometry/presets';
import { CORNER_RESIDUAL_GATE } from '@/lib/geometry/shape';
import { squareCornersMm } from '@/lib/geometry/square';
import { makeScene, type SceneSpec } from '@/lib/geometry/synthetic';

const m6 = PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 1200, bedHeightMm: 900, stripWidthMm: 150 });
const MM_PER_PX = 0.36;
// A straight-down view without lens distortion and with near-perfect hole centres: the square's corners are then
// the only source of shape uncertainty, and the image is a uniform scale of the bed.
const flat: SceneSpec = {
  pattern: m6, seed: 3, mmPerPx: MM_PER_PX, tiltDeg: 0, rollDeg: 0, k1: 0, k2: 0, centreNoisePx: 1e-4, cornerNoisePx: 0,
  square: { sizeMm: 150, x: 400, y: 300, angleDeg: 0 },
};

/**
 * Covariance of the six affine terms G (square mm → lattice mm) of a least-squares fit to the four corners, each
 * coordinate with 1σ `sigmaMm`: σ² (AᵀA)⁻¹ (the normal equations of linear least squares), built and inverted with
 * ml-matrix. Parameters: G00, G01, t0, G10, G11, t1.
 */
function affineCovariance(sizeMm: number, sigmaMm: number): Matrix {
  const rows: number[][] = [];
  for (const [x, y] of squareCornersMm(sizeMm)) { rows.push([x, y, 1, 0, 0, 0]); rows.push([0, 0, 0, x, y, 1]); }
  const A = new Matrix(rows);
  return inverse(A.transpose().mmul(A)).mul(sigmaMm ** 2);
}

describe('lattice shape uncertainty from the reference square', () => {
  it('states the scale and squareness 1σ of independent corners as the normal equations of the affine fit give them', () => {
    const sigmaPx = 0.05;
    const sc = makeScene(flat);
    sc.points.reference.cornerSigmaPx = sigmaPx;
    const r = analyzePoints(sc.points, m6);
    const C = affineCovariance(150, sigmaPx * MM_PER_PX);
    // G ≈ a turn by a multiple of 90°: scale X's relative error is that of one diagonal term, squareness's the sum of
    // the two off-diagonal terms (first order; the square's symmetry makes every choice of turn give the same).
    const scaleSigma = Math.sqrt(C.get(0, 0));
    const squarenessSigmaRad = Math.sqrt(C.get(1, 1) + C.get(3, 3) + 2 * C.get(1, 3));
    expect(r.lattice.uncertainty.scaleX! / scaleSigma).toBeCloseTo(1, 1);
    expect(r.lattice.uncertainty.scaleY! / scaleSigma).toBeCloseTo(1, 1);
    expect(((r.lattice.uncertainty.squarenessDeg! * Math.PI) / 180) / squarenessSigmaRad).toBeCloseTo(1, 1);
    // And the textbook slope form: σ(slope) = σ / √Σ(x − x̄)², here σ_c / side in px.
    expect(r.lattice.uncertainty.scaleX! / (sigmaPx / (150 / MM_PER_PX))).toBeCloseTo(1, 1);
  });

  it('scales the stated uncertainty with the corner precision the points give', () => {
    const a = makeScene(flat), b = makeScene(flat);
    a.points.reference.cornerSigmaPx = 0.1;
    b.points.reference.cornerSigmaPx = 0.04;
    const ra = analyzePoints(a.points, m6), rb = analyzePoints(b.points, m6);
    expect(rb.lattice.uncertainty.scaleX! / ra.lattice.uncertainty.scaleX!).toBeCloseTo(0.4, 2);
    expect(rb.lattice.uncertainty.squarenessDeg! / ra.lattice.uncertainty.squarenessDeg!).toBeCloseTo(0.4, 2);
  });

  it('keeps a stated corner precision the square agrees with, and takes the residual when the square shows it too optimistic', () => {
    // Corners 0.3 px off at random, stated as 0.02 px: the square's own residual (2 degrees of freedom) exceeds
    // the χ² gate at 99 % and replaces the stated value.
    const noisy = makeScene({ ...flat, cornerNoisePx: 0.3, seed: 5 });
    noisy.points.reference.cornerSigmaPx = 0.02;
    const rn = analyzePoints(noisy.points, m6);
    const dn = rn.diagnostics as { cornerSigmaPx: number; squareResidualPx: number };
    expect(dn.squareResidualPx).toBeGreaterThan(CORNER_RESIDUAL_GATE * 0.02);
    expect(dn.cornerSigmaPx).toBe(dn.squareResidualPx);
    // Exact corners stated at 0.05 px: the residual is far below it, the stated value stays.
    const exact = makeScene(flat);
    exact.points.reference.cornerSigmaPx = 0.05;
    const de = analyzePoints(exact.points, m6).diagnostics as { cornerSigmaPx: number };
    expect(de.cornerSigmaPx).toBe(0.05);
  });

  it('gives each position at least the uncertainty of its centre and more the farther it lies from the square', () => {
    const sc = makeScene({ ...flat, centreNoisePx: 0.05 });
    sc.points.reference.cornerSigmaPx = 0.05;
    const r = analyzePoints(sc.points, m6);
    const seen = r.positions.filter((p) => p.measured);
    const cx = seen.reduce((s, p) => s + p.nominal.x, 0) / seen.length, cy = seen.reduce((s, p) => s + p.nominal.y, 0) / seen.length;
    const near = seen.reduce((a, b) => (Math.hypot(a.nominal.x - cx, a.nominal.y - cy) < Math.hypot(b.nominal.x - cx, b.nominal.y - cy) ? a : b));
    const far = seen.reduce((a, b) => (Math.hypot(a.nominal.x - cx, a.nominal.y - cy) > Math.hypot(b.nominal.x - cx, b.nominal.y - cy) ? a : b));
    expect(far.uncertaintyMm!).toBeGreaterThan(near.uncertaintyMm!);
    // Centre term alone: residual scatter (px) × mm per px.
    expect(near.uncertaintyMm!).toBeGreaterThanOrEqual((r.diagnostics as { centreSigmaPx: number }).centreSigmaPx * MM_PER_PX * 0.99);
  });

  it("adds the square's size uncertainty to both scales alike, leaving squareness alone", () => {
    // A relative size error ε scales both axes: var(sx) grows by (sx·ε)², squareness not at all (first order).
    const a = makeScene(flat), b = makeScene(flat);
    a.points.reference.cornerSigmaPx = 0.05;
    b.points.reference.cornerSigmaPx = 0.05;
    b.points.reference.sizeSigmaMm = 0.15;
    const ra = analyzePoints(a.points, m6), rb = analyzePoints(b.points, m6);
    const eps = 0.15 / 150;
    for (const k of ['scaleX', 'scaleY'] as const) {
      const expected = Math.sqrt(ra.lattice.uncertainty[k]! ** 2 + (ra.lattice[k]! * eps) ** 2);
      expect(rb.lattice.uncertainty[k]! / expected).toBeCloseTo(1, 6);
    }
    expect(rb.lattice.uncertainty.squarenessDeg!).toBeCloseTo(ra.lattice.uncertainty.squarenessDeg!, 12);
  });
});
