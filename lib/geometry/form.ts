/**
 * Hole-to-hole (form) deviations and the check of the lattice's overall size and squareness.
 *
 * Form: each measured position's deviation once the lattice's own shape is taken out, i.e. its residual after the
 * best 2-D affine map of all fitted positions onto nominal (offset, turn, scale X and Y, squareness). That is what a
 * fixture spanning part of the bed feels, and it does not depend on the reference square: the positions are taken in
 * the lattice frame (the fitted homography's own frame, before the square's shape is applied), so only the centre
 * noise and the fit itself enter its uncertainty.
 * Panels: the positions keep their panel's misplacement (they are where the holes really are), and the affine is one
 * map over all panels, so a panel out of place shows in the form deviations of its holes; only what an affine can
 * absorb (a common move, turn, stretch or shear, e.g. a linear trend of the strips' offsets) is taken out.
 * Robust: Huber-weighted IRLS, so a few bad holes do not tilt the affine.
 * Uncertainty: the estimator is linear in the positions for fixed weights, e = (I − P) m with the hat matrix
 * P = X (Xᵀ W X)⁻¹ Xᵀ W (X rows [1, x, y]); with independent per-axis σᵢ,
 * var(eᵢ) = σᵢ² (1 − 2 Pᵢᵢ) + Σⱼ Pᵢⱼ² σⱼ² (per axis), so a position's own leverage and every other position's noise
 * are both counted; a position left out of the fit (weight 0) gets σᵢ² plus the fit's share.
 *
 * Shape check: the largest displacement at any nominal position that the measured scale X, scale Y and squareness
 * make after the best rigid placement, with its 1σ from the terms' σ, against the tightest tolerance.
 *
 * Frames and units: bed frame, mm (origin front-left, +X right, +Y away from the operator); angles in radians.
 */
import { composeAffine, type Mat2 } from './affine';
import { huberWeight, madSigma, median } from './robust';
import { rigid2 } from './umeyama';
import { positionVerdict } from './verdict';
import type { Verdict } from './contract';

/** 2-D affine y = L x + t, mm. */
export interface FormAffine { L: Mat2; t: [number, number] }

export interface FormFit {
  affine: FormAffine;
  /** Form deviation per point (measured − affine(nominal)), mm: x0, y0, x1, y1, … */
  residualMm: Float64Array;
  /** 1σ per axis of each point's form deviation, mm. */
  sigmaMm: Float64Array;
  /** Final IRLS weight per point (0 for points kept out of the fit). */
  weights: Float64Array;
}

/** Solves the symmetric 3×3 system M z = b (row-major M); throws on a singular M. */
function inv3(m: number[]): number[] {
  const [a, b, c, d, e, f, g, h, i] = m as [number, number, number, number, number, number, number, number, number];
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!(Math.abs(det) > 1e-300)) throw new RangeError('affine fit needs non-collinear points');
  return [A / det, -(b * i - c * h) / det, (b * f - c * e) / det, B / det, (a * i - c * g) / det, -(a * f - c * d) / det, C / det, -(a * h - b * g) / det, (a * e - b * d) / det];
}

/**
 * Weighted least-squares affine fit measured ≈ L·nominal + t and the exact per-axis variance of each residual for
 * independent per-axis σ. Nominal is centred on the weighted centroid for conditioning.
 * @param nominalMm x0, y0, … mm
 * @param measuredMm x0, y0, … mm
 * @param sigmaMm 1σ per axis of each measured point, mm
 * @param w weight per point (≥ 0; at least 3 non-collinear points with w > 0)
 */
export function weightedAffine(nominalMm: ArrayLike<number>, measuredMm: ArrayLike<number>, sigmaMm: ArrayLike<number>, w: ArrayLike<number>): FormFit {
  const n = sigmaMm.length;
  let sw = 0, cx = 0, cy = 0;
  for (let i = 0; i < n; i++) { sw += w[i]!; cx += w[i]! * nominalMm[2 * i]!; cy += w[i]! * nominalMm[2 * i + 1]!; }
  if (!(sw > 0)) throw new RangeError('affine fit needs weighted points');
  cx /= sw; cy /= sw;
  // M = Σ w x xᵀ, S = Σ w² σ² x xᵀ, b = Σ w x mᵀ with x = [1, X, Y].
  const M = new Array<number>(9).fill(0), S = new Array<number>(9).fill(0), bx = [0, 0, 0], by = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    const wi = w[i]!;
    if (!(wi > 0)) continue;
    const x = [1, nominalMm[2 * i]! - cx, nominalMm[2 * i + 1]! - cy];
    const s2 = wi * wi * sigmaMm[i]! ** 2;
    for (let a = 0; a < 3; a++) {
      bx[a]! += wi * x[a]! * measuredMm[2 * i]!; by[a]! += wi * x[a]! * measuredMm[2 * i + 1]!;
      for (let b = 0; b < 3; b++) { M[3 * a + b]! += wi * x[a]! * x[b]!; S[3 * a + b]! += s2 * x[a]! * x[b]!; }
    }
  }
  const Mi = inv3(M);
  const mul = (A: number[], v: number[]) => [0, 1, 2].map((r) => A[3 * r]! * v[0]! + A[3 * r + 1]! * v[1]! + A[3 * r + 2]! * v[2]!);
  const px = mul(Mi, bx), py = mul(Mi, by);
  // Mi S Mi, for Σⱼ Pᵢⱼ² σⱼ² = xᵢᵀ Mi S Mi xᵢ.
  const MS = [0, 1, 2].flatMap((r) => [0, 1, 2].map((c) => Mi[3 * r]! * S[c]! + Mi[3 * r + 1]! * S[3 + c]! + Mi[3 * r + 2]! * S[6 + c]!));
  const MSM = [0, 1, 2].flatMap((r) => [0, 1, 2].map((c) => MS[3 * r]! * Mi[c]! + MS[3 * r + 1]! * Mi[3 + c]! + MS[3 * r + 2]! * Mi[6 + c]!));
  const quad = (A: number[], x: number[]) => { let s = 0; for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) s += x[a]! * A[3 * a + b]! * x[b]!; return s; };
  const residualMm = new Float64Array(2 * n), sig = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = [1, nominalMm[2 * i]! - cx, nominalMm[2 * i + 1]! - cy];
    residualMm[2 * i] = measuredMm[2 * i]! - (px[0]! + px[1]! * x[1]! + px[2]! * x[2]!);
    residualMm[2 * i + 1] = measuredMm[2 * i + 1]! - (py[0]! + py[1]! * x[1]! + py[2]! * x[2]!);
    const pii = w[i]! * quad(Mi, x);
    sig[i] = Math.sqrt(Math.max(0, sigmaMm[i]! ** 2 * (1 - 2 * pii) + quad(MSM, x)));
  }
  const L: Mat2 = [px[1]!, px[2]!, py[1]!, py[2]!];
  const t: [number, number] = [px[0]! - L[0] * cx - L[1] * cy, py[0]! - L[2] * cx - L[3] * cy];
  return { affine: { L, t }, residualMm, sigmaMm: sig, weights: Float64Array.from(w) };
}

/**
 * Robust (Huber IRLS) affine fit of measured lattice-frame positions onto nominal, and each point's form deviation
 * with its 1σ. Points with `inFit` 0 are not used for the affine but get a deviation and σ too.
 * The Huber threshold is 2 robust σ of the residual components (MAD), never below 2 × the median stated σ.
 */
export function formFit(nominalMm: ArrayLike<number>, measuredMm: ArrayLike<number>, sigmaMm: ArrayLike<number>, inFit?: ArrayLike<number>, iterations = 4): FormFit {
  const n = sigmaMm.length;
  const prior = Float64Array.from({ length: n }, (_, i) => (inFit && !inFit[i] ? 0 : 1 / Math.max(sigmaMm[i]!, 1e-9) ** 2));
  const floor = median(Array.from({ length: n }, (_, i) => sigmaMm[i]!).filter((_, i) => prior[i]! > 0));
  let fit = weightedAffine(nominalMm, measuredMm, sigmaMm, prior);
  for (let it = 0; it < iterations; it++) {
    const comps: number[] = [];
    for (let i = 0; i < n; i++) if (prior[i]! > 0) comps.push(fit.residualMm[2 * i]!, fit.residualMm[2 * i + 1]!);
    const k = 2 * Math.max(madSigma(comps), floor);
    const w = prior.map((p, i) => p * huberWeight(Math.hypot(fit.residualMm[2 * i]!, fit.residualMm[2 * i + 1]!), k));
    fit = weightedAffine(nominalMm, measuredMm, sigmaMm, w);
  }
  return fit;
}

/** A position's form result (bed frame, mm), as in the report. */
export interface PositionForm { dx: number; dy: number; r: number; uncertaintyMm: number; verdict: Exclude<Verdict, 'missing'> }

/** Form result of point i of a fit against radial tolerance tolMm. */
export function positionForm(fit: FormFit, i: number, tolMm: number): PositionForm {
  const dx = fit.residualMm[2 * i]!, dy = fit.residualMm[2 * i + 1]!, r = Math.hypot(dx, dy), u = fit.sigmaMm[i]!;
  return { dx, dy, r, uncertaintyMm: u, verdict: positionVerdict(r, u, tolMm) as PositionForm['verdict'] };
}

export interface ShapeTerms { scaleX: number; scaleY: number; squarenessRad: number }

/** The lattice's overall size and squareness against the tightest tolerance (mm); null figures when not observed. */
export interface ShapeCheck { verdict: Exclude<Verdict, 'missing'>; worstMm: number | null; uncertaintyMm: number | null; toleranceMm: number }

/** Displacement (mm) of each nominal point by the shape terms after the best rigid placement (about the centroid). */
export function shapeDisplacements(nominalMm: ArrayLike<number>, n: number, t: ShapeTerms): Float64Array {
  const L = composeAffine({ rotationRad: 0, scaleX: t.scaleX, scaleY: t.scaleY, squarenessRad: t.squarenessRad });
  let cx = 0, cy = 0;
  for (let i = 0; i < n; i++) { cx += nominalMm[2 * i]!; cy += nominalMm[2 * i + 1]!; }
  cx /= n; cy /= n;
  const moved = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    const x = nominalMm[2 * i]! - cx, y = nominalMm[2 * i + 1]! - cy;
    moved[2 * i] = cx + L[0] * x + L[1] * y; moved[2 * i + 1] = cy + L[2] * x + L[3] * y;
  }
  const rg = rigid2(moved, nominalMm, n);
  const c = Math.cos(rg.angleRad), s = Math.sin(rg.angleRad);
  const d = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    const x = moved[2 * i]!, y = moved[2 * i + 1]!;
    d[2 * i] = c * x - s * y + rg.tx - nominalMm[2 * i]!;
    d[2 * i + 1] = s * x + c * y + rg.ty - nominalMm[2 * i + 1]!;
  }
  return d;
}

/**
 * Shape check: the largest displacement the measured scale and squareness make at any nominal position, its 1σ
 * (per axis, from the terms' independent σ by a numerical Jacobian at that position) and its verdict against tolMm.
 * Without observed terms the verdict is `marginal` (the reference cannot judge) and the figures are null.
 */
export function shapeCheck(nominalMm: ArrayLike<number>, n: number, terms: ShapeTerms | null, sigma: ShapeTerms | null, tolMm: number): ShapeCheck {
  if (!terms || !sigma || n < 2) return { verdict: 'marginal', worstMm: null, uncertaintyMm: null, toleranceMm: tolMm };
  const d0 = shapeDisplacements(nominalMm, n, terms);
  let k = 0, worst = -1;
  for (let i = 0; i < n; i++) { const r = Math.hypot(d0[2 * i]!, d0[2 * i + 1]!); if (r > worst) { worst = r; k = i; } }
  let v = 0;
  for (const key of ['scaleX', 'scaleY', 'squarenessRad'] as const) {
    const h = 1e-6;
    const d = shapeDisplacements(nominalMm, n, { ...terms, [key]: terms[key] + h });
    v += (((d[2 * k]! - d0[2 * k]!) / h) ** 2 + ((d[2 * k + 1]! - d0[2 * k + 1]!) / h) ** 2) * sigma[key] ** 2;
  }
  const u = Math.sqrt(v / 2);
  return { verdict: positionVerdict(worst, u, tolMm) as ShapeCheck['verdict'], worstMm: worst, uncertaintyMm: u, toleranceMm: tolMm };
}
