/**
 * Observability of the lattice's global shape. The fitted homography H (bed lattice frame mm → undistorted
 * image px, bedfit.ts) holds the camera's perspective and the lattice's shape together; the reference square,
 * the one thing in the photo known to be square and of known size, separates them. Its corners (px) are
 * undistorted with the lens fitted from the lattice's straightness, mapped through H⁻¹ into the lattice frame
 * (mm), and an affine map G from the square's metric frame (mm) onto them is fitted; L = G⁻¹'s linear part maps
 * lattice-frame lengths to true lengths, so its decomposition gives scale X, scale Y and squareness (affine.ts).
 * Uncertainty: the square's corner precision (px) and H's covariance, propagated by numerical Jacobians.
 */
import { decomposeAffine, fitAffine, invert2, type AffineTerms, type Mat2 } from './affine';
import { undistortPx } from './camera';
import type { BedModel } from './bedfit';
import type { Pt } from './homography';
import { applyH, mat3Inv, mat3Mul, type Mat3 } from './linalg';
import { squareCornersMm } from './square';

export interface ShapeEstimate {
  /** Lattice frame → true (metric) frame, linear part. */
  L: Mat2;
  terms: AffineTerms;
  sigma: { scaleX: number; scaleY: number; squarenessRad: number };
  cornerSigmaPx: number;
  /** RMS of the square's affine fit, px (2 degrees of freedom). */
  squareResidualPx: number;
  squareSidePx: number;
}

function modelHinv(m: BedModel, g: ArrayLike<number>): Mat3 {
  const Hn: Mat3 = [g[0]!, g[1]!, g[2]!, g[3]!, g[4]!, g[5]!, g[6]!, g[7]!, 1];
  return mat3Inv(mat3Mul(mat3Inv(m.Ti), mat3Mul(Hn, m.Tb)));
}

function shapeOf(m: BedModel, cornersPx: readonly Pt[], sizeMm: number, g: ArrayLike<number>): { L: Mat2; resMm: number } {
  const Hinv = modelHinv(m, g);
  const lens = { ...m.lens, k1: g[8]!, k2: g[9]! };
  const q = cornersPx.map((c) => { const [x, y] = undistortPx(lens, c[0], c[1]); return applyH(Hinv, x, y) as Pt; });
  const s = squareCornersMm(sizeMm);
  const G = fitAffine(s, q);
  let rss = 0;
  s.forEach((p, i) => { rss += (G.L[0] * p[0] + G.L[1] * p[1] + G.t[0] - q[i]![0]) ** 2 + (G.L[2] * p[0] + G.L[3] * p[1] + G.t[1] - q[i]![1]) ** 2; });
  return { L: invert2(G.L), resMm: Math.sqrt(rss / 2) };
}

const wrap = (a: number) => Math.atan2(Math.sin(a), Math.cos(a));

/** Lattice shape from the square, with 1σ uncertainties. `cornerSigmaPx` is the assumed corner precision. */
export function latticeShape(m: BedModel, cornersPx: readonly Pt[], sizeMm: number, cornerSigmaPx: number): ShapeEstimate {
  const g0 = Float64Array.from([...m.hHat.subarray(0, 8), m.lens.k1, m.lens.k2]);
  const base = shapeOf(m, cornersPx, sizeMm, g0);
  const t0 = decomposeAffine(base.L);
  const side = (cornersPx.reduce((s, c, i) => { const d = cornersPx[(i + 1) % 4]!; return s + Math.hypot(d[0] - c[0], d[1] - c[1]); }, 0)) / 4;
  const pxPerMm = side / sizeMm;
  const resPx = base.resMm * pxPerMm;
  const sc = Math.max(cornerSigmaPx, resPx);
  const vec = (L: Mat2) => { const t = decomposeAffine(L); return [t.scaleX, t.scaleY, wrap(t.squarenessRad - t0.squarenessRad)]; };
  const v0 = vec(base.L);
  const var3 = [0, 0, 0];
  // Corners: independent, isotropic σ.
  const h = 0.01;
  for (let k = 0; k < 8; k++) {
    const c = cornersPx.map((p) => [p[0], p[1]] as [number, number]);
    c[k >> 1]![k & 1]! += h;
    const v = vec(shapeOf(m, c, sizeMm, g0).L);
    for (let a = 0; a < 3; a++) var3[a]! += ((v[a]! - v0[a]!) / h) ** 2 * sc * sc;
  }
  // Homography and lens: full covariance of the 10 global parameters.
  const Jg: number[][] = [[], [], []];
  for (let p = 0; p < 10; p++) {
    const sd = Math.sqrt(Math.max(m.cov[p * m.np + p]!, 0));
    const step = sd > 0 && Number.isFinite(sd) ? sd * 1e-2 : 1e-9;
    const g = Float64Array.from(g0);
    g[p]! += step;
    const v = vec(shapeOf(m, cornersPx, sizeMm, g).L);
    for (let a = 0; a < 3; a++) Jg[a]![p] = (v[a]! - v0[a]!) / step;
  }
  for (let a = 0; a < 3; a++) {
    let s = 0;
    for (let p = 0; p < 10; p++) for (let q = 0; q < 10; q++) s += Jg[a]![p]! * m.cov[p * m.np + q]! * Jg[a]![q]!;
    var3[a]! += Number.isFinite(s) ? Math.max(s, 0) : Infinity;
  }
  return {
    L: base.L, terms: t0,
    sigma: { scaleX: Math.sqrt(var3[0]!), scaleY: Math.sqrt(var3[1]!), squarenessRad: Math.sqrt(var3[2]!) },
    cornerSigmaPx: sc, squareResidualPx: resPx, squareSidePx: side,
  };
}

/**
 * 1σ of a scalar function of the fit's 10 global parameters (8 homography entries, k1, k2), by a numerical
 * Jacobian and the fit's covariance. `f` receives the homography bed lattice frame → undistorted px.
 */
export function globalSigma(m: BedModel, f: (H: Mat3, k1: number, k2: number) => number): number {
  const g0 = Float64Array.from([...m.hHat.subarray(0, 8), m.lens.k1, m.lens.k2]);
  const Hof = (g: Float64Array) => mat3Inv(modelHinv(m, g));
  const v0 = f(Hof(g0), g0[8]!, g0[9]!);
  const J: number[] = [];
  for (let p = 0; p < 10; p++) {
    const sd = Math.sqrt(Math.max(m.cov[p * m.np + p]!, 0));
    const step = sd > 0 && Number.isFinite(sd) ? sd * 1e-2 : 1e-9;
    const g = Float64Array.from(g0);
    g[p]! += step;
    J.push((f(Hof(g), g[8]!, g[9]!) - v0) / step);
  }
  let s = 0;
  for (let p = 0; p < 10; p++) for (let q = 0; q < 10; q++) s += J[p]! * m.cov[p * m.np + q]! * J[q]!;
  return Number.isFinite(s) ? Math.sqrt(Math.max(s, 0)) : Infinity;
}
