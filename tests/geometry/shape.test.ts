import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix, inverse } from 'ml-matrix';
import { analyzePoints } from '@/lib/geometry/analyze';
import { PRESETS } from '@/lib/geometry/presets';
import { CORNER_RESIDUAL_GATE } from '@/lib/geometry/shape';
import { squareCornersMm } from '@/lib/geometry/square';
import { mulberry32, normalFrom } from '@/lib/geometry/random';
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
    const dn = rn.diagnostics!;
    expect(dn.squareResidualPx).toBeGreaterThan(CORNER_RESIDUAL_GATE * 0.02);
    expect(dn.cornerSigmaPx).toBe(dn.squareResidualPx);
    // Exact corners stated at 0.05 px: the residual is far below it, the stated value stays.
    const exact = makeScene(flat);
    exact.points.reference.cornerSigmaPx = 0.05;
    const de = analyzePoints(exact.points, m6).diagnostics!;
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
    expect(near.uncertaintyMm!).toBeGreaterThanOrEqual(r.diagnostics!.centreSigmaPx * MM_PER_PX * 0.99);
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

  it('takes a full corner covariance as the same σ when it is σ² I, whatever the order the corners come in', () => {
    const a = makeScene(flat);
    a.points.reference.cornerSigmaPx = 0.05;
    const b = makeScene(flat);
    b.points.reference.cornerCovPx2 = Array.from({ length: 64 }, (_, i) => (i % 9 === 0 ? 0.05 ** 2 : 0));
    const c = makeScene(flat);
    const k = c.points.reference.corners;
    c.points.reference.corners = [k[2], k[3], k[0], k[1]];
    c.points.reference.cornerCovPx2 = b.points.reference.cornerCovPx2;
    const [ra, rb, rc] = [a, b, c].map((sc) => analyzePoints(sc.points, m6));
    for (const r of [rb, rc]) {
      expect(r!.lattice.uncertainty.scaleX! / ra!.lattice.uncertainty.scaleX!).toBeCloseTo(1, 9);
      expect(r!.lattice.uncertainty.squarenessDeg! / ra!.lattice.uncertainty.squarenessDeg!).toBeCloseTo(1, 9);
    }
  });

  it('states the scatter of corners that err together through shared sides, as a Monte Carlo of them shows', () => {
    // Corners found as meeting points of fitted sides: the two corners on one side share that side's offset error
    // (σ 0.05 px) besides their own (σ 0.02 px). Draws from that covariance (Cholesky factor by ml-matrix), each
    // through the whole analysis, against the σ stated for the covariance.
    const pattern = PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 600, bedHeightMm: 500, stripWidthMm: 250 });
    const spec: SceneSpec = { ...flat, pattern, square: { sizeMm: 150, x: 200, y: 200, angleDeg: 0 } };
    const base = makeScene(spec);
    const k = base.points.reference.corners;
    const mx = k.reduce((s, c) => s + c[0], 0) / 4, my = k.reduce((s, c) => s + c[1], 0) / 4;
    const side = (i: number, axis: 0 | 1) => (k[i]![axis] < (axis ? my : mx) ? 0 : 1);
    const C = new Matrix(8, 8);
    for (let i = 0; i < 8; i++) for (let j = 0; j < 8; j++) {
      const ci = i >> 1, cj = j >> 1, ax = (i & 1) as 0 | 1;
      if ((i & 1) === (j & 1) && side(ci, ax) === side(cj, ax)) C.set(i, j, 0.05 ** 2);
      if (i === j) C.set(i, j, C.get(i, j) + 0.02 ** 2);
    }
    const stated = makeScene(spec);
    stated.points.reference.cornerCovPx2 = C.to1DArray();
    const r0 = analyzePoints(stated.points, pattern);
    const independent = makeScene(spec);
    independent.points.reference.cornerSigmaPx = Math.sqrt(0.05 ** 2 + 0.02 ** 2);
    const rInd = analyzePoints(independent.points, pattern);
    const Lc = new CholeskyDecomposition(C).lowerTriangularMatrix;
    const gauss = normalFrom(mulberry32(17));
    const sx: number[] = [];
    for (let n = 0; n < 300; n++) {
      const e = Lc.mmul(Matrix.columnVector(Array.from({ length: 8 }, () => gauss())));
      const sc = makeScene(spec);
      sc.points.reference.corners = k.map((c, i) => [c[0] + e.get(2 * i, 0), c[1] + e.get(2 * i + 1, 0)]) as typeof k;
      sc.points.reference.cornerSigmaPx = 1; // the point estimate only: no gate on the residual
      sx.push(analyzePoints(sc.points, pattern).lattice.scaleX!);
    }
    const mean = sx.reduce((a, b) => a + b, 0) / sx.length;
    const sd = Math.sqrt(sx.reduce((a, b) => a + (b - mean) ** 2, 0) / (sx.length - 1));
    // 300 draws: the sample σ is within ±12 % (3 standard errors, 1/√(2·299) each) of the true one.
    expect(r0.lattice.uncertainty.scaleX! / sd).toBeGreaterThan(0.88);
    expect(r0.lattice.uncertainty.scaleX! / sd).toBeLessThan(1.12);
    // Independent corners of the same per-corner σ would understate it.
    expect(rInd.lattice.uncertainty.scaleX! / sd).toBeLessThan(0.85);
  });
});
