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
import { PARAM, paramCov, type BedModel } from './bedfit';
import type { Pt } from './homography';
import { applyH, mat3Inv, mat3Mul, type Mat3 } from './linalg';
import { squareCornersMm } from './square';

export interface ShapeEstimate {
  /** Lattice frame → true (metric) frame, linear part. */
  L: Mat2;
  terms: AffineTerms;
  sigma: { scaleX: number; scaleY: number; squarenessRad: number };
  /** Covariance of (scaleX, scaleY, squarenessRad), row-major 3 × 3 (scales unitless, squareness rad). */
  cov: number[];
  /** 1σ of scale X and Y from the corners alone and from the fit (homography and lens) alone (unitless). */
  parts: { cornersScale: number; fitScale: number };
  /** Corner precision used, px: the stated one, or the square's own residual when that shows it too optimistic. */
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

/**
 * The square's residual (8 coordinates, 6 affine terms: 2 degrees of freedom) over the stated corner σ, above which
 * the stated σ is judged too optimistic: √(χ²₂ at 99 % / 2) = √(9.2103 / 2) (χ² quantile, standard tables).
 */
export const CORNER_RESIDUAL_GATE = Math.sqrt(9.2103 / 2);

/** The assumed corner precision (px) when neither the points nor the caller state one. */
export const DEFAULT_CORNER_SIGMA_PX = 0.1;

/** What is known of the square's precision; all optional. */
export interface SquarePrecision {
  /** Stated 1σ of each corner coordinate, px (independent corners). */
  cornerSigmaPx?: number;
  /**
   * Full covariance of the corners' coordinates (x0, y0, x1, y1, …, in the order of `cornersPx`), px², row-major 8 × 8:
   * for a detector whose corners share fitted sides (and so err together). Overrides `cornerSigmaPx`.
   */
  cornerCovPx2?: readonly number[];
  /** 1σ of the square's true side, mm. */
  sizeSigmaMm?: number;
}

/**
 * Lattice shape from the square, with 1σ uncertainties and their covariance.
 * Corners: covariance Σ_c = σ_c² I with the stated σ_c, or the stated full covariance; with neither, σ_c = 0.1 px
 * raised to the square's own residual whenever that is larger. A stated precision is scaled up to the square's residual
 * only when the residual exceeds its RMS σ by `CORNER_RESIDUAL_GATE` (χ² test at 99 %), since a residual of 2 degrees
 * of freedom scatters widely (its square is exponential) and taking the larger of the two would inflate σ by chance.
 * Size: a relative error ε = sizeSigmaMm/size scales both axes alike, δsx = sx·ε, δsy = sy·ε, so it adds
 * ε²·[[sx², sx·sy, 0], [sx·sy, sy², 0], [0, 0, 0]] to the covariance.
 */
export function latticeShape(m: BedModel, cornersPx: readonly Pt[], sizeMm: number, precision: SquarePrecision = {}): ShapeEstimate {
  const { cornerSigmaPx, cornerCovPx2, sizeSigmaMm = 0 } = precision;
  const g0 = Float64Array.from([...m.hHat.subarray(0, 8), m.lens.k1, m.lens.k2]);
  const base = shapeOf(m, cornersPx, sizeMm, g0);
  const t0 = decomposeAffine(base.L);
  const side = (cornersPx.reduce((s, c, i) => { const d = cornersPx[(i + 1) % 4]!; return s + Math.hypot(d[0] - c[0], d[1] - c[1]); }, 0)) / 4;
  const pxPerMm = side / sizeMm;
  const resPx = base.resMm * pxPerMm;
  // Stated corner σ (RMS over the eight coordinates when a covariance is given) and the factor the residual may impose.
  const statedRms = cornerCovPx2 ? Math.sqrt(Math.max(0, [0, 1, 2, 3, 4, 5, 6, 7].reduce((s, k) => s + cornerCovPx2[k * 9]!, 0) / 8)) : cornerSigmaPx;
  const sc = statedRms === undefined ? Math.max(DEFAULT_CORNER_SIGMA_PX, resPx) : resPx > CORNER_RESIDUAL_GATE * statedRms ? resPx : statedRms;
  const Sc = (k: number, l: number) => (cornerCovPx2 && statedRms ? cornerCovPx2[k * 8 + l]! * (sc / statedRms) ** 2 : k === l ? sc * sc : 0);
  const vec = (L: Mat2) => { const t = decomposeAffine(L); return [t.scaleX, t.scaleY, wrap(t.squarenessRad - t0.squarenessRad)]; };
  const v0 = vec(base.L);
  // Corners. Jc is 3 × 8.
  const h = 0.01;
  const Jc: number[][] = [[], [], []];
  for (let k = 0; k < 8; k++) {
    const c = cornersPx.map((p) => [p[0], p[1]] as [number, number]);
    c[k >> 1]![k & 1]! += h;
    const v = vec(shapeOf(m, c, sizeMm, g0).L);
    for (let a = 0; a < 3; a++) Jc[a]![k] = (v[a]! - v0[a]!) / h;
  }
  // Homography and lens: full covariance of the 10 global parameters. Jg is 3 × 10.
  const Jg: number[][] = [[], [], []];
  for (let p = 0; p < PARAM.global; p++) {
    const sd = Math.sqrt(Math.max(paramCov(m, p, p), 0));
    const step = sd > 0 && Number.isFinite(sd) ? sd * 1e-2 : 1e-9;
    const g = Float64Array.from(g0);
    g[p]! += step;
    const v = vec(shapeOf(m, cornersPx, sizeMm, g).L);
    for (let a = 0; a < 3; a++) Jg[a]![p] = (v[a]! - v0[a]!) / step;
  }
  const covC = new Array<number>(9).fill(0), covG = new Array<number>(9).fill(0);
  for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) {
    let s = 0;
    for (let k = 0; k < 8; k++) for (let l = 0; l < 8; l++) s += Jc[a]![k]! * Sc(k, l) * Jc[b]![l]!;
    covC[a * 3 + b] = s;
    let t = 0;
    for (let p = 0; p < PARAM.global; p++) for (let q = 0; q < PARAM.global; q++) t += Jg[a]![p]! * paramCov(m, p, q) * Jg[b]![q]!;
    covG[a * 3 + b] = Number.isFinite(t) ? t : a === b ? Infinity : 0;
  }
  const eps2 = (sizeSigmaMm / sizeMm) ** 2;
  const covS = [t0.scaleX ** 2, t0.scaleX * t0.scaleY, 0, t0.scaleX * t0.scaleY, t0.scaleY ** 2, 0, 0, 0, 0].map((v) => v * eps2);
  const cov = covC.map((c, i) => c + covG[i]! + covS[i]!);
  const sd = (c: number[], i: number) => Math.sqrt(Math.max(c[i * 4]!, 0));
  return {
    L: base.L, terms: t0,
    sigma: { scaleX: sd(cov, 0), scaleY: sd(cov, 1), squarenessRad: sd(cov, 2) },
    cov,
    parts: { cornersScale: Math.hypot(sd(covC, 0), sd(covC, 1)) / Math.SQRT2, fitScale: Math.hypot(sd(covG, 0), sd(covG, 1)) / Math.SQRT2 },
    cornerSigmaPx: sc, squareResidualPx: resPx, squareSidePx: side,
  };
}

/**
 * The square's precision from the points' reference (image px) for the corners in the order analysis uses them
 * (`ordered`, a reordering of `reference.corners`): a stated covariance is permuted to that order. `overrideSigmaPx`
 * (the caller's option) replaces whatever the points state.
 */
export function squarePrecision(
  reference: { corners: readonly (readonly [number, number])[]; cornerSigmaPx?: number; cornerCovPx2?: readonly number[]; sizeSigmaMm?: number },
  ordered: readonly Pt[], overrideSigmaPx?: number,
): SquarePrecision {
  const size = reference.sizeSigmaMm !== undefined ? { sizeSigmaMm: reference.sizeSigmaMm } : {};
  if (overrideSigmaPx !== undefined) return { cornerSigmaPx: overrideSigmaPx, ...size };
  const C = reference.cornerCovPx2;
  if (C) {
    const perm = ordered.map((p) => reference.corners.findIndex((c) => c[0] === p[0] && c[1] === p[1]));
    if (perm.every((i) => i >= 0)) {
      const idx = (k: number) => 2 * perm[k >> 1]! + (k & 1);
      const out: number[] = [];
      for (let k = 0; k < 8; k++) for (let l = 0; l < 8; l++) out.push(C[idx(k) * 8 + idx(l)]!);
      return { cornerCovPx2: out, ...size };
    }
  }
  return { ...(reference.cornerSigmaPx !== undefined ? { cornerSigmaPx: reference.cornerSigmaPx } : {}), ...size };
}

/**
 * Mean per-axis variance (mm²) of the displacement that an error of the shape terms makes at (ex, ey) mm from the
 * centroid of the fitted positions, once the best rigid fit has taken out turn and offset. With δL =
 * [[δsx, −δq], [0, δsy]] (X axis kept fixed), the shear's antisymmetric half is a turn the rigid fit absorbs, so
 * dx = ex·δsx − ey·δq/2 and dy = ey·δsy − ex·δq/2; the variance uses the full covariance of (sx, sy, q).
 */
export function shapeDisplacementVar(cov: readonly number[], ex: number, ey: number): number {
  const quad = (g: readonly number[]) => { let s = 0; for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) s += g[a]! * cov[a * 3 + b]! * g[b]!; return s; };
  return Math.max(0, (quad([ex, 0, -ey / 2]) + quad([0, ey, -ex / 2])) / 2);
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
  for (let p = 0; p < PARAM.global; p++) {
    const sd = Math.sqrt(Math.max(paramCov(m, p, p), 0));
    const step = sd > 0 && Number.isFinite(sd) ? sd * 1e-2 : 1e-9;
    const g = Float64Array.from(g0);
    g[p]! += step;
    J.push((f(Hof(g), g[8]!, g[9]!) - v0) / step);
  }
  let s = 0;
  for (let p = 0; p < PARAM.global; p++) for (let q = 0; q < PARAM.global; q++) s += J[p]! * paramCov(m, p, q) * J[q]!;
  return Number.isFinite(s) ? Math.sqrt(Math.max(s, 0)) : Infinity;
}
