/**
 * Joint Levenberg–Marquardt fit of the lens and the bed: observed hole centre (image px) =
 * distort(H(panel_j(nominal))), where
 * - nominal is the position's nominal bed point (mm, bed frame),
 * - panel_j(n) = c_j + R(ρ_j)(n − c_j) + (dx_j, dy_j) is panel j's rigid offset (mm, rad) about its centre c_j,
 *   with zero mean over the fitted panels (the gauge: a common move is the camera's),
 * - H is a free plane homography from the bed lattice frame (mm) to undistorted image px; it holds the camera's
 *   perspective and the lattice's global shape, which the photo alone cannot tell apart (the reference square
 *   separates them, see shape.ts); being common to all panels, its shape is set by the shape within panels,
 * - distort is Brown–Conrady radial k1, k2 about the principal point (camera.ts), fitted from straightness;
 * - observed is the centroid of the hole's image, which perspective and the lens move off the image of its centre
 *   (centroidShiftPx), so the prediction carries that shift for the hole's nominal radius;
 * - (fx_f, fy_f) is a common offset of hole family f (mm, lattice frame), added after the panel's move, for every
 *   family but the one with the most matches (the gauge): a family's centres can all be shifted by how its holes look
 *   (a lit dog-hole wall, a flange ring), which a fit without it spreads into the perspective and so into the shape.
 * Robust: Huber-weighted IRLS around LM, then redescending (Tukey) weights, so that a misplaced hole has no pull.
 * Returns the estimates with their covariance (the sandwich σ² A⁻¹ (JᵀW²J) A⁻¹, A = JᵀWJ).
 */
import { applyH, invertSpd, mat3Inv, mat3Mul, type Mat3 } from './linalg';
import { levenbergMarquardt } from './levenberg-marquardt';
import { homographyScale, normalisingTransform, type Pt } from './homography';
import { discImageCentroidInto, undistortPx, type Lens } from './camera';
import { huberWeight, madSigma, tukeyWeight } from './robust';
import type { PanelInfo } from './lattice';

export interface BedFitInput {
  /** Nominal bed points, mm (x0, y0, x1, y1, …). */
  nominal: Float64Array;
  /** Observed centres, image px (u0, v0, …). */
  observed: Float64Array;
  panel: Int32Array;
  /** Nominal radius of each match's hole, mm; without it centres are taken as images of the holes' centres. */
  radiusMm?: Float64Array;
  /** Hole family index per match (0 … families − 1); without it all matches are of one family. */
  family?: Int32Array;
  n: number;
  panels: PanelInfo[];
  lens: Lens;
  /** Initial bed → undistorted-px homography. */
  H0: Mat3;
  fitDistortion?: boolean;
  /** Per-match prior weights in [0, 1] (detector confidence). */
  weights?: Float64Array;
  warm?: BedModel;
}

export interface BedModel {
  H: Mat3;
  Hinv: Mat3;
  lens: Lens;
  panelDx: Float64Array;
  panelDy: Float64Array;
  panelRot: Float64Array;
  /** Parameter index of panel j's dx (dy = +1, rot = +2), or −1 if the panel had too few holes to fit. */
  panelParam: Int32Array;
  /** Common offset of each hole family, mm (lattice frame; 0 for the gauge family and families not fitted). */
  familyDx: Float64Array;
  familyDy: Float64Array;
  /** Parameter index of family f's dx (dy = +1), or −1 for the gauge family and families without an offset. */
  familyParam: Int32Array;
  /** Matches of each family in the fit. */
  familyMatches: Int32Array;
  /**
   * Covariance of all parameters (np × np, row-major), in the layout of `PARAM`: 0–7 the normalised homography, 8–9
   * k1 k2, then (dx mm, dy mm, ρ rad) per fitted panel, then (dx mm, dy mm) per family with an offset. Read it through `paramCov`, `paramSigma`, `panelParams`.
   */
  cov: Float64Array;
  np: number;
  /** Robust 1σ of the image residuals, px (per axis). */
  sigmaPx: number;
  /** Final IRLS weights per match. */
  weights: Float64Array;
  /** Residuals per match, px (observed − predicted). */
  residualPx: Float64Array;
  /** Normalisations used by the parameterisation (H = Ti⁻¹ Ĥ Tb). */
  Tb: Mat3;
  Ti: Mat3;
  hHat: Float64Array;
}

/**
 * Parameter layout of the fit: entries 0–7 of the normalised homography Ĥ (H = Ti⁻¹ Ĥ Tb, Ĥ[8] = 1), then the
 * radial distortion k1, k2; these `GLOBAL` parameters come first, then (dx mm, dy mm, ρ rad) for each fitted panel,
 * then (dx mm, dy mm) for each family with an offset.
 */
export const PARAM = { homography: 0, k1: 8, k2: 9, global: 10 } as const;
const NG = PARAM.global;

/** Covariance of parameters a and b (units of the parameters, e.g. mm² for panel offsets). */
export function paramCov(m: BedModel, a: number, b: number): number {
  return m.cov[a * m.np + b]!;
}

/** 1σ of parameter a (0 when its variance comes out negative by round-off, NaN when the fit could not state it). */
export function paramSigma(m: BedModel, a: number): number {
  return Math.sqrt(Math.max(0, paramCov(m, a, a)));
}

/** Parameter indices of panel j's offset (dx, dy mm) and turn (rot rad), or null when the panel was not fitted. */
export function panelParams(m: BedModel, j: number): { dx: number; dy: number; rot: number } | null {
  const b = m.panelParam[j]!;
  return b < 0 ? null : { dx: b, dy: b + 1, rot: b + 2 };
}

/** gᵀ Σ g over the parameters `idx` (Σ their covariance block): the variance of the linear combination g. */
export function paramQuadratic(m: BedModel, idx: readonly number[], g: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < idx.length; i++) for (let k = 0; k < idx.length; k++) s += g[i]! * paramCov(m, idx[i]!, idx[k]!) * g[k]!;
  return s;
}

/**
 * Per-axis variance (mm²) that a hole family's common offset leaves in each of its positions, by family. One photo
 * cannot tell a family really set off from the others from a family whose holes only look shifted (a lit dog-hole
 * wall moved their centroids by 0.05–0.19 px in rendered scenes), so the offsets are taken as drawn with a variance
 * τ² per axis, estimated from the fitted ones (the gauge family's is 0): τ² = Σ_f |b_f − b̄|² / (2 (N − 1)). The
 * placement onto nominal takes out their mean weighted by matches (shares w_f), which leaves family f with
 * var(b_f − Σ_g w_g b_g) = τ² (1 − 2 w_f + Σ_g w_g²). All 0 with one family.
 */
export function familyOffsetVarMm2(m: BedModel): Float64Array {
  const nf = m.familyParam.length, out = new Float64Array(nf);
  const b: [number, number][] = [];
  m.familyParam.forEach((p, f) => { if (p >= 0) b.push([m.familyDx[f]!, m.familyDy[f]!]); });
  if (!b.length) return out;
  b.push([0, 0]);
  const mx = b.reduce((s, q) => s + q[0], 0) / b.length, my = b.reduce((s, q) => s + q[1], 0) / b.length;
  const tau2 = b.reduce((s, q) => s + (q[0] - mx) ** 2 + (q[1] - my) ** 2, 0) / (2 * (b.length - 1));
  const total = m.familyMatches.reduce((s, c) => s + c, 0);
  const w = Array.from(m.familyMatches, (c) => c / Math.max(1, total));
  const sw2 = w.reduce((s, x) => s + x * x, 0);
  for (let f = 0; f < nf; f++) out[f] = tau2 * Math.max(0, 1 - 2 * w[f]! + sw2);
  return out;
}

/** Local scale of the image → lattice map at image point (u, v) px, mm per px (homography part; the lens is near 1). */
export function mmPerPxAt(m: BedModel, u: number, v: number): number {
  return homographyScale(m.Hinv, u, v);
}

/** Maps an observed image point (px) to the bed lattice frame (mm) through the fitted lens and homography. */
export function toLattice(m: BedModel, u: number, v: number): [number, number] {
  const [x, y] = undistortPx(m.lens, u, v);
  return applyH(m.Hinv, x, y);
}

type ImageMap = (x: number, y: number, o: Float64Array) => void;

/** Lattice mm → image px through H (lattice mm → undistorted px, applyH) and the lens (distortPx), into `o`. */
function imageMap(H: Mat3, lens: Lens): ImageMap {
  const { fPx, cx, cy, k1, k2 } = lens;
  return (px, py, o) => {
    const w = H[6] * px + H[7] * py + H[8];
    const xn = ((H[0] * px + H[1] * py + H[2]) / w - cx) / fPx, yn = ((H[3] * px + H[4] * py + H[5]) / w - cy) / fPx;
    const r2 = xn * xn + yn * yn, d = 1 + k1 * r2 + k2 * r2 * r2;
    o[0] = cx + fPx * xn * d; o[1] = cy + fPx * yn * d;
  };
}

/**
 * How far the centroid of the image of a round hole lies from the image of its centre, px (image x, y), into `out`:
 * the hole of radius `radiusMm` at lattice point (x, y) mm through `img` (imageMap: H, lattice mm → undistorted px,
 * and the lens). Perspective and radial distortion bend the disc into a shape whose centroid — what a centroid or an
 * ellipse fit measures — is moved by about R² times the map's curvature: 0.02–0.05 px for a 20 mm hole at 0.38 mm/px
 * with k1 = ±0.05, growing with the distance from the image centre like a scale error of 20–50 ppm in that family's
 * centres (discImageCentroidInto).
 */
function centroidShiftPx(img: ImageMap, x: number, y: number, radiusMm: number, out: Float64Array): void {
  img(x, y, out);
  const u0 = out[0]!, v0 = out[1]!;
  discImageCentroidInto(img, x, y, radiusMm, out);
  out[0] = out[0]! - u0; out[1] = out[1]! - v0;
}

/**
 * Maps a detected hole centre (image px, the centroid of its image) of a hole of nominal radius `radiusMm` to the
 * lattice frame (mm): the centroid's shift off the image of the centre (centroidShiftPx) taken out first.
 */
export function holeToLattice(m: BedModel, u: number, v: number, radiusMm: number): [number, number] {
  return holeToLatticeMap(m)(u, v, radiusMm);
}

/** holeToLattice of the model m, for mapping many holes: (u, v px, radiusMm) → lattice point, mm. */
export function holeToLatticeMap(m: BedModel): (u: number, v: number, radiusMm: number) => [number, number] {
  const img = imageMap(m.H, m.lens), d = new Float64Array(2);
  return (u, v, radiusMm) => {
    const [x, y] = toLattice(m, u, v);
    centroidShiftPx(img, x, y, radiusMm, d);
    return toLattice(m, u - d[0]!, v - d[1]!);
  };
}

/** Predicted image point (px) of nominal (x, y) in panel j, of hole family f (default 0). */
export function predictPx(m: BedModel, x: number, y: number, j: number, panels: PanelInfo[], f = 0): [number, number] {
  const q = panels[j]!;
  const c = Math.cos(m.panelRot[j]!), s = Math.sin(m.panelRot[j]!);
  const ax = x - q.cx, ay = y - q.cy;
  const px = q.cx + c * ax - s * ay + m.panelDx[j]! + (m.familyDx[f] ?? 0), py = q.cy + s * ax + c * ay + m.panelDy[j]! + (m.familyDy[f] ?? 0);
  const [uu, vv] = applyH(m.H, px, py);
  const xn = (uu - m.lens.cx) / m.lens.fPx, yn = (vv - m.lens.cy) / m.lens.fPx;
  const r2 = xn * xn + yn * yn, d = 1 + m.lens.k1 * r2 + m.lens.k2 * r2 * r2;
  return [m.lens.cx + m.lens.fPx * xn * d, m.lens.cy + m.lens.fPx * yn * d];
}

/**
 * Which panels get parameters (those with ≥ 3 matches, when there is more than one panel), which families get an
 * offset, and where.
 */
interface ParamLayout {
  /** Parameter index of panel j's dx, or −1. */
  panelParam: Int32Array;
  /** The fitted panels' indices. */
  fitted: number[];
  /** Parameter index of family f's dx, or −1. */
  familyParam: Int32Array;
  /** Number of parameters. */
  np: number;
}

/** Matches a family needs, beside as many of the gauge family in one panel, to get an offset of its own. */
const FAMILY_MIN_MATCHES = 3;

function paramLayout(inp: BedFitInput): ParamLayout {
  const { n, panels } = inp;
  const perPanel = new Int32Array(panels.length);
  for (let k = 0; k < n; k++) perPanel[inp.panel[k]!]!++;
  const panelParam = new Int32Array(panels.length).fill(-1);
  let np = NG;
  const fitted: number[] = [];
  if (panels.length > 1) panels.forEach((_, j) => { if (perPanel[j]! >= 3) { panelParam[j] = np; np += 3; fitted.push(j); } });
  // The family with the most matches is the gauge; another gets an offset when it shares a panel with it (≥ 3 matches
  // of each there), else its offset would be that panel's.
  const fam = inp.family;
  const nf = fam ? Math.max(0, ...fam) + 1 : 1;
  const familyParam = new Int32Array(nf).fill(-1);
  if (fam && nf > 1) {
    const count = new Int32Array(nf * panels.length), total = new Int32Array(nf);
    for (let k = 0; k < n; k++) { count[fam[k]! * panels.length + inp.panel[k]!]!++; total[fam[k]!]!++; }
    const gauge = total.indexOf(Math.max(...total));
    for (let f = 0; f < nf; f++) {
      if (f === gauge) continue;
      if (panels.some((_, j) => count[f * panels.length + j]! >= FAMILY_MIN_MATCHES && count[gauge * panels.length + j]! >= FAMILY_MIN_MATCHES)) { familyParam[f] = np; np += 2; }
    }
  }
  return { panelParam, fitted, familyParam, np };
}

/** Hartley normalisations of the nominal points (Tb, bed mm) and the observed ones (Ti, image px); a warm start's own. */
function normalisations(inp: BedFitInput): { Tb: Mat3; Ti: Mat3 } {
  if (inp.warm) return { Tb: inp.warm.Tb, Ti: inp.warm.Ti };
  const nomPts: Pt[] = [], obsPts: Pt[] = [];
  for (let k = 0; k < inp.n; k++) { nomPts.push([inp.nominal[2 * k]!, inp.nominal[2 * k + 1]!]); obsPts.push([inp.observed[2 * k]!, inp.observed[2 * k + 1]!]); }
  return { Tb: normalisingTransform(nomPts), Ti: normalisingTransform(obsPts) };
}

/** θ to start from: a warm model's parameters when its layout matches, else Ĥ from H0 and the given lens, panels at rest. */
function startingParameters(inp: BedFitInput, layout: ParamLayout, Tb: Mat3, Ti: Mat3): Float64Array {
  const theta = new Float64Array(layout.np);
  const warm = inp.warm;
  if (warm && warm.np === layout.np) {
    theta.set(warm.hHat.subarray(0, 8));
    theta[PARAM.k1] = warm.lens.k1; theta[PARAM.k2] = warm.lens.k2;
    layout.fitted.forEach((j) => { const b = layout.panelParam[j]!; theta[b] = warm.panelDx[j]!; theta[b + 1] = warm.panelDy[j]!; theta[b + 2] = warm.panelRot[j]!; });
    layout.familyParam.forEach((b, f) => { if (b >= 0) { theta[b] = warm.familyDx[f] ?? 0; theta[b + 1] = warm.familyDy[f] ?? 0; } });
  } else {
    const hh = mat3Mul(Ti, mat3Mul(inp.H0, mat3Inv(Tb)));
    for (let i = 0; i < 8; i++) theta[i] = hh[i]! / hh[8];
    theta[PARAM.k1] = inp.lens.k1; theta[PARAM.k2] = inp.lens.k2;
  }
  return theta;
}

/** Most Jacobian columns one match touches: 10 global + 3 of its panel + 2 of its family. */
const MAX_COLS = NG + 5;

/**
 * The model's prediction for one match: residual (predicted − observed, px) and, on request, its sparse Jacobian
 * (rows x and y in `J[0..]` and `J[MAX_COLS..]`, the parameter index of each column in `cols`). `at(θ)` first, then
 * `evalMatch` of each match at that θ (the panels' turns are taken through cos and sin once per θ).
 */
function matchModel(inp: BedFitInput, layout: ParamLayout, Tb: Mat3, Ti: Mat3, fitK: boolean, shift: Float64Array) {
  const { panels, nominal, observed } = inp;
  const { panelParam, familyParam } = layout;
  const sb = Tb[0], si = Ti[0];
  const { cx, cy, fPx } = inp.lens;
  const J = new Float64Array(2 * MAX_COLS);
  const cols = new Int32Array(MAX_COLS);
  const R = MAX_COLS;
  const cosRot = new Float64Array(panels.length), sinRot = new Float64Array(panels.length);
  let t: Float64Array = new Float64Array(0);
  /** Sets θ for the following `evalMatch` calls. */
  const at = (theta: Float64Array) => {
    t = theta;
    for (const j of layout.fitted) { const b = panelParam[j]!; cosRot[j] = Math.cos(t[b + 2]!); sinRot[j] = Math.sin(t[b + 2]!); }
  };
  /** Residual of match k at θ (`at`) into `out`; with `wantJ` also J and cols. Returns the number of columns used. */
  const evalMatch = (k: number, out: Float64Array, wantJ: boolean): number => {
    const nx = nominal[2 * k]!, ny = nominal[2 * k + 1]!, j = inp.panel[k]!;
    const b = panelParam[j]!, fb = inp.family ? familyParam[inp.family[k]!]! : -1;
    // Panel j's rigid move of the nominal point (mm) and the family's offset, then Hartley-normalised.
    let px = nx, py = ny, ax = 0, ay = 0, c = 1, s = 0;
    if (b >= 0) {
      const q = panels[j]!;
      c = cosRot[j]!; s = sinRot[j]!;
      ax = nx - q.cx; ay = ny - q.cy;
      px = q.cx + c * ax - s * ay + t[b]!; py = q.cy + s * ax + c * ay + t[b + 1]!;
    }
    if (fb >= 0) { px += t[fb]!; py += t[fb + 1]!; }
    const qx = sb * px + Tb[2], qy = sb * py + Tb[5];
    // Ĥ, back to undistorted px, then Brown–Conrady about the principal point.
    const den = t[6]! * qx + t[7]! * qy + 1;
    const wx = (t[0]! * qx + t[1]! * qy + t[2]!) / den, wy = (t[3]! * qx + t[4]! * qy + t[5]!) / den;
    const uu = (wx - Ti[2]) / si, vv = (wy - Ti[5]) / si;
    const xn = (uu - cx) / fPx, yn = (vv - cy) / fPx;
    const r2 = xn * xn + yn * yn, k1 = t[PARAM.k1]!, k2 = t[PARAM.k2]!;
    const d = 1 + k1 * r2 + k2 * r2 * r2;
    out[0] = cx + fPx * xn * d + shift[2 * k]! - observed[2 * k]!;
    out[1] = cy + fPx * yn * d + shift[2 * k + 1]! - observed[2 * k + 1]!;
    if (!wantJ) return 0;
    const dp = k1 + 2 * k2 * r2;
    // d obs / d (uu, vv)
    const D00 = d + 2 * xn * xn * dp, D01 = 2 * xn * yn * dp, D11 = d + 2 * yn * yn * dp;
    // d (uu, vv) / d (wx, wy) = 1/si; chain to d obs / d w
    const E00 = D00 / si, E01 = D01 / si, E11 = D11 / si;
    const g0 = qx / den, g1 = qy / den, g2 = 1 / den;
    // wx depends on t0..2 and t6,7; wy on t3..5 and t6,7
    cols[0] = 0; J[0] = E00 * g0; J[R] = E01 * g0;
    cols[1] = 1; J[1] = E00 * g1; J[R + 1] = E01 * g1;
    cols[2] = 2; J[2] = E00 * g2; J[R + 2] = E01 * g2;
    cols[3] = 3; J[3] = E01 * g0; J[R + 3] = E11 * g0;
    cols[4] = 4; J[4] = E01 * g1; J[R + 4] = E11 * g1;
    cols[5] = 5; J[5] = E01 * g2; J[R + 5] = E11 * g2;
    let m = 6;
    const g6x = (-wx * qx) / den, g6y = (-wy * qx) / den, g7x = (-wx * qy) / den, g7y = (-wy * qy) / den;
    cols[m] = 6; J[m] = E00 * g6x + E01 * g6y; J[R + m] = E01 * g6x + E11 * g6y; m++;
    cols[m] = 7; J[m] = E00 * g7x + E01 * g7y; J[R + m] = E01 * g7x + E11 * g7y; m++;
    cols[m] = PARAM.k1; J[m] = fitK ? fPx * xn * r2 : 0; J[R + m] = fitK ? fPx * yn * r2 : 0; m++;
    cols[m] = PARAM.k2; J[m] = fitK ? fPx * xn * r2 * r2 : 0; J[R + m] = fitK ? fPx * yn * r2 * r2 : 0; m++;
    if (b >= 0 || fb >= 0) {
      // d w / d q (homography Jacobian), d q / d p = sb
      const a00 = ((t[0]! - wx * t[6]!) / den) * sb, a01 = ((t[1]! - wx * t[7]!) / den) * sb;
      const a10 = ((t[3]! - wy * t[6]!) / den) * sb, a11 = ((t[4]! - wy * t[7]!) / den) * sb;
      const F00 = E00 * a00 + E01 * a10, F01 = E00 * a01 + E01 * a11, F10 = E01 * a00 + E11 * a10, F11 = E01 * a01 + E11 * a11;
      if (b >= 0) {
        const drx = -s * ax - c * ay, dry = c * ax - s * ay;
        cols[m] = b; J[m] = F00; J[R + m] = F10; m++;
        cols[m] = b + 1; J[m] = F01; J[R + m] = F11; m++;
        cols[m] = b + 2; J[m] = F00 * drx + F01 * dry; J[R + m] = F10 * drx + F11 * dry; m++;
      }
      // the family's parameters come after every panel's, so the columns stay in increasing order
      if (fb >= 0) {
        cols[m] = fb; J[m] = F00; J[R + m] = F10; m++;
        cols[m] = fb + 1; J[m] = F01; J[R + m] = F11; m++;
      }
    }
    return m;
  };
  return { at, evalMatch, J, cols };
}

/**
 * Priors, as quadratic penalties: the gauge (the fitted panels' mean offset and turn are zero: a common move is the
 * camera's), a weak pull of each panel's and family's offset (per mm²) and panel's turn (per degree²) to rest, and
 * of k1, k2 to zero.
 */
const GAUGE = 1e6, GAUGE_ROT = 1e4, PRIOR_MM = 1e-4, PRIOR_RAD = 1e-4 * (180 / Math.PI) ** 2, PRIOR_K = 1e-6;
/** Damping that pins k1, k2 when distortion is not fitted. */
const PIN_K = 1e12;

function priorPenalty(t: Float64Array, layout: ParamLayout): number {
  const { fitted, panelParam, familyParam } = layout;
  let c = 0;
  for (const b of familyParam) if (b >= 0) c += PRIOR_MM * (t[b]! ** 2 + t[b + 1]! ** 2);
  if (fitted.length) {
    let sx = 0, sy = 0, sr = 0;
    for (const j of fitted) { const b = panelParam[j]!; sx += t[b]!; sy += t[b + 1]!; sr += t[b + 2]!; c += PRIOR_MM * (t[b]! ** 2 + t[b + 1]! ** 2) + PRIOR_RAD * t[b + 2]! ** 2; }
    const P = fitted.length;
    c += GAUGE * ((sx / P) ** 2 + (sy / P) ** 2 + (sr / P) ** 2 * GAUGE_ROT);
  }
  c += PRIOR_K * (t[PARAM.k1]! ** 2 + t[PARAM.k2]! ** 2);
  return c;
}

/** Adds the priors' part of the normal equations at θ. */
function addPriorNormalEquations(t: Float64Array, layout: ParamLayout, fitK: boolean, jtj: Float64Array, jtr: Float64Array): void {
  const { fitted, panelParam, familyParam, np } = layout;
  for (const b of familyParam) if (b >= 0) for (const a of [b, b + 1]) { jtj[a * np + a]! += PRIOR_MM; jtr[a]! += PRIOR_MM * t[a]!; }
  if (fitted.length) {
    const P = fitted.length;
    for (let o = 0; o < 3; o++) {
      const g = GAUGE * (o === 2 ? GAUGE_ROT : 1) / (P * P);
      let sum = 0;
      for (const j of fitted) sum += t[panelParam[j]! + o]!;
      for (const ja of fitted) {
        const a = panelParam[ja]! + o;
        jtr[a]! += g * sum;
        for (const jb of fitted) jtj[a * np + panelParam[jb]! + o]! += g;
        jtj[a * np + a]! += o === 2 ? PRIOR_RAD : PRIOR_MM;
        jtr[a]! += (o === 2 ? PRIOR_RAD : PRIOR_MM) * t[a]!;
      }
    }
  }
  for (const a of [PARAM.k1, PARAM.k2]) { jtj[a * np + a]! += PRIOR_K + (fitK ? 0 : PIN_K); jtr[a]! += PRIOR_K * t[a]!; }
}

/**
 * IRLS: Huber weights at this many robust σ of the residuals for the first round, then Tukey's biweight at
 * `TUKEY_C` σ (its usual constant for 95 % efficiency at the normal, Beaton & Tukey 1974). Huber's pull is bounded
 * but not zero: three holes 0.8 mm (some 200 σ) off put 30 ppm into the scale of exact rendered data; the biweight
 * gives them none, once Huber has brought the fit near. A warm start is near already: the biweight from the start.
 */
const HUBER_K = 2;
const TUKEY_C = 4.685;
/** Least residual σ the robust weights are scaled by, px. */
const MIN_SIGMA_PX = 1e-3;
/** IRLS rounds (each a Levenberg–Marquardt run, then new weights), from a cold and from a warm start. */
const IRLS_ROUNDS = 3, IRLS_ROUNDS_WARM = 2;

/**
 * Fits the model to the matches: Levenberg–Marquardt (levenberg-marquardt.ts) inside IRLS (Huber, then Tukey), then
 * the covariance of the weighted estimate for those weights, the sandwich σ² A⁻¹ (Σ uₖ² pₖ JₖᵀJₖ) A⁻¹ with A = JᵀWJ
 * (plus the priors), wₖ = pₖuₖ the prior (detector confidence) times the robust weight and σ² the residual variance
 * of a match of prior weight 1 (px², robust: from the MAD).
 */
export function fitBed(inp: BedFitInput): BedModel {
  const { n, panels } = inp;
  const fitK = inp.fitDistortion !== false;
  const layout = paramLayout(inp);
  const { np, panelParam, fitted, familyParam } = layout;
  const { Tb, Ti } = normalisations(inp);
  const theta = startingParameters(inp, layout, Tb, Ti);
  const prior = inp.weights ?? new Float64Array(n).fill(1);
  const w = Float64Array.from(prior);
  const res = new Float64Array(2 * n);
  // Each match's centroid shift (px), from the parameters of the round before (the first two rounds of a cold start,
  // which fit the lens, else the start): it changes with them only to second order.
  const shift = new Float64Array(2 * n);
  const updateShifts = (t: Float64Array) => {
    if (!inp.radiusMm) return;
    const Hn: Mat3 = [t[0]!, t[1]!, t[2]!, t[3]!, t[4]!, t[5]!, t[6]!, t[7]!, 1];
    const img = imageMap(mat3Mul(mat3Inv(Ti), mat3Mul(Hn, Tb)), { ...inp.lens, k1: t[PARAM.k1]!, k2: t[PARAM.k2]! });
    const d = new Float64Array(2);
    for (let k = 0; k < n; k++) { centroidShiftPx(img, inp.nominal[2 * k]!, inp.nominal[2 * k + 1]!, inp.radiusMm[k]!, d); shift[2 * k] = d[0]!; shift[2 * k + 1] = d[1]!; }
  };
  const { at, evalMatch, J, cols } = matchModel(inp, layout, Tb, Ti, fitK, shift);

  const r = new Float64Array(2);
  const cost = (t: Float64Array) => {
    let c = 0;
    at(t);
    for (let k = 0; k < n; k++) { evalMatch(k, r, false); c += w[k]! * (r[0]! ** 2 + r[1]! ** 2); }
    return c + priorPenalty(t, layout);
  };
  const residuals = (t: Float64Array) => {
    at(t);
    for (let k = 0; k < n; k++) { evalMatch(k, r, false); res[2 * k] = r[0]!; res[2 * k + 1] = r[1]!; }
  };
  const jtj = new Float64Array(np * np), jtr = new Float64Array(np);
  /**
   * JᵀWJ and JᵀWr at θ (and the residuals into `res`); with `mid`, also the matches' part of the sandwich's middle,
   * Σ uₖ² pₖ JₖᵀJₖ = Σ (wₖ² / pₖ) JₖᵀJₖ, added into it.
   */
  const normalEquations = (t: Float64Array, mid?: Float64Array) => {
    jtj.fill(0); jtr.fill(0);
    at(t);
    for (let k = 0; k < n; k++) {
      const m = evalMatch(k, r, true);
      res[2 * k] = r[0]!; res[2 * k + 1] = r[1]!;
      const wk = w[k]!;
      if (!(wk > 0)) continue;
      // Upper triangle only (columns are in increasing order); mirrored below.
      for (let a = 0; a < m; a++) {
        const ca = cols[a]!, ja0 = wk * J[a]!, ja1 = wk * J[MAX_COLS + a]!;
        jtr[ca]! += ja0 * r[0]! + ja1 * r[1]!;
        const row = ca * np;
        for (let bb = a; bb < m; bb++) jtj[row + cols[bb]!]! += ja0 * J[bb]! + ja1 * J[MAX_COLS + bb]!;
      }
      if (!mid || !(prior[k]! > 0)) continue;
      const g = (wk * wk) / prior[k]!;
      for (let a = 0; a < m; a++) {
        const ja0 = g * J[a]!, ja1 = g * J[MAX_COLS + a]!, row = cols[a]! * np;
        for (let bb = 0; bb < m; bb++) mid[row + cols[bb]!]! += ja0 * J[bb]! + ja1 * J[MAX_COLS + bb]!;
      }
    }
    for (let i = 0; i < np; i++) for (let j = 0; j < i; j++) jtj[i * np + j] = jtj[j * np + i]!;
    addPriorNormalEquations(t, layout, fitK, jtj, jtr);
    return { jtj, jtr };
  };

  // IRLS: Huber weights at 2 σ, then the biweight (from the start when warm).
  const reweight = (huber: boolean) => {
    residuals(theta);
    // a thousandth of a pixel at least: below any detector's precision, so that parameters not yet converged to the
    // last digit (exact data) cannot make their matches outliers
    const sigma = Math.max(madSigma(res), MIN_SIGMA_PX);
    for (let k = 0; k < n; k++) {
      const rk = Math.hypot(res[2 * k]!, res[2 * k + 1]!);
      w[k] = prior[k]! * (huber ? huberWeight(rk, HUBER_K * sigma) : tukeyWeight(rk, TUKEY_C * sigma));
    }
  };
  const warm = !!inp.warm;
  updateShifts(theta);
  if (warm) reweight(false);
  for (let outer = 0; outer < (warm ? IRLS_ROUNDS_WARM : IRLS_ROUNDS); outer++) {
    if (outer === 1 && !warm) updateShifts(theta);
    levenbergMarquardt({ n: np, cost, normalEquations }, theta, { maxIterations: outer === 0 && !warm ? 25 : 10, lambda: 1e-4, minRelativeGain: 1e-7 });
    reweight(outer === 0 && !warm);
  }

  // Covariance: A = JᵀWJ with the priors, and the matches' part of the sandwich's middle.
  const mid = new Float64Array(np * np);
  normalEquations(theta, mid);
  // Residual variance from the MAD of the residual components (each scaled by √ of its prior weight, so that all
  // share one variance), 1.4826 × MAD being consistent for normal errors (Rousseeuw & Croux 1993), times 2n/(2n − np)
  // for the fitted parameters. The Huber-weighted RSS would let a few misplaced holes, down-weighted but not out,
  // raise every σ: three holes 0.8 mm off among a hundred doubled the variance in rendered scenes.
  const std: number[] = [];
  for (let k = 0; k < n; k++) if (prior[k]! > 0) { const q = Math.sqrt(prior[k]!); std.push(q * res[2 * k]!, q * res[2 * k + 1]!); }
  const s2 = madSigma(std) ** 2 * (std.length / Math.max(1, std.length - np));
  const inv = invertSpd(jtj, np);
  const cov = inv ? sandwich(inv, mid, np, s2) : new Float64Array(np * np).fill(NaN);

  const Hn: Mat3 = [theta[0]!, theta[1]!, theta[2]!, theta[3]!, theta[4]!, theta[5]!, theta[6]!, theta[7]!, 1];
  const H = mat3Mul(mat3Inv(Ti), mat3Mul(Hn, Tb));
  const panelDx = new Float64Array(panels.length), panelDy = new Float64Array(panels.length), panelRot = new Float64Array(panels.length);
  fitted.forEach((j) => { const b = panelParam[j]!; panelDx[j] = theta[b]!; panelDy[j] = theta[b + 1]!; panelRot[j] = theta[b + 2]!; });
  const familyDx = new Float64Array(familyParam.length), familyDy = new Float64Array(familyParam.length);
  familyParam.forEach((b, f) => { if (b >= 0) { familyDx[f] = theta[b]!; familyDy[f] = theta[b + 1]!; } });
  const familyMatches = new Int32Array(familyParam.length);
  if (inp.family) for (let k = 0; k < n; k++) familyMatches[inp.family[k]!]!++;
  return {
    H, Hinv: mat3Inv(H), lens: { ...inp.lens, k1: theta[PARAM.k1]!, k2: theta[PARAM.k2]! }, panelDx, panelDy, panelRot, panelParam, familyDx, familyDy, familyParam, familyMatches, cov, np,
    sigmaPx: Math.sqrt(s2), weights: w, residualPx: Float64Array.from(res), Tb, Ti, hHat: Float64Array.from(theta),
  };
}

/** s² A⁻¹ M A⁻¹ (np × np, row-major) for A⁻¹ `inv` and the middle `mid`. */
function sandwich(inv: Float64Array, mid: Float64Array, np: number, s2: number): Float64Array {
  const t = new Float64Array(np * np), out = new Float64Array(np * np);
  for (let i = 0; i < np; i++) for (let k = 0; k < np; k++) { const a = inv[i * np + k]!; if (a !== 0) for (let j = 0; j < np; j++) t[i * np + j]! += a * mid[k * np + j]!; }
  for (let i = 0; i < np; i++) for (let k = 0; k < np; k++) { const a = t[i * np + k]!; if (a !== 0) for (let j = 0; j < np; j++) out[i * np + j]! += a * inv[k * np + j]!; }
  return out.map((x) => x * s2);
}
