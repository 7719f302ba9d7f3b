/**
 * Joint fit of the reference square's edges: every edge point of the outer edges (and, for a framed target, of the
 * frame's inner edges) against one model — a plane homography from the target's unit frame to undistorted image
 * coordinates, one radial lens term, and the camera's edge bias — by Gauss–Newton, with the corners' covariance
 * propagated from the parameters' (Hartley & Zisserman 2nd ed. §5.2.4: Σ_c = J Σ_θ Jᵀ, Σ_θ = (Jᵀ Σ_r⁻¹ J)⁻¹).
 *
 * Why one model instead of four corners from four curves: a frame's outer corners lie 5 % of the side beyond its
 * centreline; carrying them there with a homography alone, while the lens bends the image, put them 0.1–0.2 px off
 * (a 200 ppm scale error on a 400 px square). Here the lens term bends all eight edges at once, so the corners are
 * where the model puts them, and the edge bias (how far a dark/light edge reads on the light side of the true one:
 * tone curves, sharpening) is a fitted number: the stroke's outer and inner edges move apart by twice the bias.
 *
 * Frames: image px (origin top-left, +y down); internally image coordinates normalised about the image centre,
 * p̃ = (p − c) / N. Target unit frame: corners (0, 0), (1, 0), (1, 1), (0, 1) in the order of the quad given; side
 * s runs from corner s to s + 1; a frame's inner edges are the lines at f and 1 − f.
 * Lens: the division model p̃_u = p̃ / (1 + λ |p̃|²) (Fitzgibbon, CVPR 2001), centred on the image centre.
 * Edge bias: per side for a frame (its outer and inner edge share it), one for a plain square, where it cannot be
 * seen and enters as a prior (mean ± 1σ), so its uncertainty reaches the corners' covariance.
 * Noise: the edge points' residual scatter, raised for their correlation along the edge by the effective sample
 * size of an autocorrelated series, n_eff = n / (1 + 2 Σ ρ_k) (common practice in time-series statistics; the sum
 * over the positive-lag autocorrelations until the first non-positive one).
 */
import { applyH, homographyFrom4, invertHomography, type Mat3 } from '@/lib/geometry/homography';

export type Px = [number, number];

/** Edge points of the square per side (side s: corner s → s + 1), image px. */
export interface SquareEdges {
  outer: Px[][];
  /** The frame stroke's inner edges, same side order; absent for a plain square. */
  inner?: Px[][];
  /** Stroke width over the outer size (the inner edges lie at f and 1 − f of the unit frame). */
  frameFraction?: number;
}

export interface EdgeFitOptions {
  /** Image size, px: the lens term is centred on the image centre and normalised by half the larger side. */
  width: number;
  height: number;
  /** Prior on the edge bias (px, positive: the dark side reads wider) where the edges cannot measure it. */
  biasPrior?: { meanPx: number; sigmaPx: number };
}

export interface SquareEdgeFit {
  /** Outer corners, image px, in the order of the guess. */
  corners: [Px, Px, Px, Px];
  /** Covariance of (x0, y0, x1, y1, …), px², row-major 8 × 8. */
  cornerCovPx2: number[];
  /** RMS over the eight coordinates of the corners' 1σ, px. */
  cornerSigmaPx: number;
  /** Edge bias per side (px; one value repeated for a plain square), its mean, and the mean's 1σ. */
  biasPx: number[];
  biasMeanPx: number;
  biasSigmaPx: number;
  /** RMS residual of the edge points about the model, px, and the correlation factor applied to the variance. */
  rmsPx: number;
  inflation: number;
  /** Lens term λ of the division model on normalised coordinates. */
  lambda: number;
  /** Points used / given. */
  used: number;
  total: number;
}

interface EdgePoint {
  x: number;
  y: number;
  side: number;
  inner: boolean;
  /** Order along its edge, for the correlation estimate. */
  edge: number;
  k: number;
}

/**
 * Edge bias assumed for a plain square, px: none on average, 1σ 0.5 px — the range the camera pipelines' tone
 * curves and sharpening put a dark/light edge at (−0.5 to +0.55 px measured on the frame stroke, README issue 11).
 */
export const DEFAULT_BIAS_PRIOR = { meanPx: 0, sigmaPx: 0.5 } as const;

/**
 * Outward unit normal (image px) of side s of the quad `q`, from the direction
 * between its corners (a lens bends it by far less than the normal's change would matter here).
 */
function normalAt(q: readonly Px[], s: number): Px {
  const a = q[s]!;
  const b = q[(s + 1) % 4]!;
  const tx = b[0] - a[0];
  const ty = b[1] - a[1];
  const L = Math.hypot(tx, ty);
  // outward: away from the quad's centre
  const mx = (q[0]![0] + q[1]![0] + q[2]![0] + q[3]![0]) / 4;
  const my = (q[0]![1] + q[1]![1] + q[2]![1] + q[3]![1]) / 4;
  let n: Px = [ty / L, -tx / L];
  if (n[0] * ((a[0] + b[0]) / 2 - mx) + n[1] * ((a[1] + b[1]) / 2 - my) < 0) n = [-n[0], -n[1]];
  return n;
}

/** Solves the symmetric positive system M x = b (Cholesky); null when not positive definite. */
function cholSolve(M: number[], b: number[], n: number): number[] | null {
  const L = new Array<number>(n * n).fill(0);
  for (let i = 0; i < n; i++)
    for (let j = 0; j <= i; j++) {
      let s = M[i * n + j]!;
      for (let k = 0; k < j; k++) s -= L[i * n + k]! * L[j * n + k]!;
      if (i === j) {
        if (s <= 0) return null;
        L[i * n + i] = Math.sqrt(s);
      } else L[i * n + j] = s / L[j * n + j]!;
    }
  const y = new Array<number>(n).fill(0);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= L[i * n + k]! * y[k]!;
    y[i] = s / L[i * n + i]!;
  }
  const x = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= L[k * n + i]! * x[k]!;
    x[i] = s / L[i * n + i]!;
  }
  return x;
}

function invertSym(M: number[], n: number): number[] | null {
  const out = new Array<number>(n * n).fill(0);
  for (let c = 0; c < n; c++) {
    const e = new Array<number>(n).fill(0);
    e[c] = 1;
    const x = cholSolve(M, e, n);
    if (!x) return null;
    for (let r = 0; r < n; r++) out[r * n + c] = x[r]!;
  }
  return out;
}

/** Effective-sample factor 1 + 2 Σ ρ_k of a residual series (positive lags up to the first non-positive one, ≤ 20). */
export function correlationFactor(r: readonly number[]): number {
  const n = r.length;
  if (n < 8) return 1;
  const m = r.reduce((a, b) => a + b, 0) / n;
  let c0 = 0;
  for (const v of r) c0 += (v - m) ** 2;
  if (c0 <= 0) return 1;
  let s = 0;
  for (let k = 1; k <= Math.min(20, n >> 2); k++) {
    let c = 0;
    for (let i = 0; i + k < n; i++) c += (r[i]! - m) * (r[i + k]! - m);
    const rho = c / c0;
    if (rho <= 0) break;
    s += rho;
  }
  return 1 + 2 * s;
}

/**
 * Normalised image frame p̃ = (p − c) / N: c = (cx, cy) the image centre, px; N half the larger side, px (so a
 * normalised length times N is px).
 */
interface NormalisedFrame {
  cx: number;
  cy: number;
  N: number;
}

function normalisedFrameOf(opts: EdgeFitOptions): NormalisedFrame {
  return { cx: opts.width / 2, cy: opts.height / 2, N: Math.max(opts.width, opts.height) / 2 };
}

/** The edge points (image px) in the normalised frame, tagged by side, outer/inner edge (0–3 outer, 4–7 inner) and order. */
function normalisedEdgePoints(edges: SquareEdges, framed: boolean, nf: NormalisedFrame): EdgePoint[] {
  const { cx, cy, N } = nf;
  const pts: EdgePoint[] = [];
  for (let s = 0; s < 4; s++) {
    (edges.outer[s] ?? []).forEach((p, k) => pts.push({ x: (p[0] - cx) / N, y: (p[1] - cy) / N, side: s, inner: false, edge: s, k }));
    if (framed) (edges.inner![s] ?? []).forEach((p, k) => pts.push({ x: (p[0] - cx) / N, y: (p[1] - cy) / N, side: s, inner: true, edge: 4 + s, k }));
  }
  return pts;
}

/**
 * The parameter vector θ = (G's eight entries with g33 = 1, λ, and `nb` edge biases in normalised px) at its
 * start: G the inverse of the homography unit frame → normalised image through the guessed corners (px), λ and the
 * biases 0. Null when the guess is no quadrilateral.
 */
function initialParameters(guess: readonly Px[], nf: NormalisedFrame, nb: number): number[] | null {
  let H0: Mat3;
  try {
    H0 = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], guess.map((p) => [(p[0] - nf.cx) / nf.N, (p[1] - nf.cy) / nf.N] as const));
  } catch {
    return null;
  }
  const G0 = invertHomography(H0);
  return [...G0.slice(0, 8).map((v) => v / G0[8]!), 0, ...new Array<number>(nb).fill(0)];
}

/**
 * Signed distance in the unit frame of (u, v) from side `side`'s outer edge (inner: the stroke's inner edge, at
 * `f` of the side), positive outward (towards the light side of an outer edge).
 */
function edgeDistance(side: number, inner: boolean, f: number, u: number, v: number): number {
  const a = inner ? f : 0;
  switch (side) {
    case 0: return -(v - a);
    case 1: return u - (1 - a);
    case 2: return v - (1 - a);
    default: return -(u - a);
  }
}

/** Normalised image point → unit frame under θ: undistorted by the division model (λ = θ₈), then mapped by G. */
function toUnitFrame(t: readonly number[], x: number, y: number): [number, number] {
  const k = 1 + t[8]! * (x * x + y * y);
  const qx = x / k;
  const qy = y / k;
  const w = t[6]! * qx + t[7]! * qy + 1;
  return [(t[0]! * qx + t[1]! * qy + t[2]!) / w, (t[3]! * qx + t[4]! * qy + t[5]!) / w];
}

/** Residuals of the edge points about the model, normalised px (px / N). */
interface EdgeResiduals {
  readonly count: number;
  /** Freezes, per point, the unit-frame distance's gradient over normalised image position at θ (for a distance in image units). */
  freeze(t: readonly number[]): void;
  /** Point i's distance from its edge moved by the edge bias (outward for an outer edge, inward for an inner one). */
  at(t: readonly number[], i: number): number;
  /** All points' residuals at θ. */
  all(t: readonly number[]): Float64Array;
}

/**
 * The residual model. `fixedBias`: a plain square's bias (normalised px), held fixed; null for a frame, whose four
 * sides' biases are θ₉…θ₁₂.
 */
function edgeResiduals(pts: readonly EdgePoint[], f: number, fixedBias: number | null): EdgeResiduals {
  const grad = new Float64Array(pts.length);
  const at = (t: readonly number[], i: number) => {
    const p = pts[i]!;
    const u = toUnitFrame(t, p.x, p.y);
    const d = edgeDistance(p.side, p.inner, f, u[0], u[1]) / grad[i]!;
    const b = fixedBias === null ? t[9 + p.side]! : fixedBias;
    return p.inner ? d + b : d - b;
  };
  return {
    count: pts.length,
    freeze(t) {
      const h = 1e-4;
      pts.forEach((p, i) => {
        const a = toUnitFrame(t, p.x, p.y);
        const bx = toUnitFrame(t, p.x + h, p.y);
        const by = toUnitFrame(t, p.x, p.y + h);
        const d0 = edgeDistance(p.side, p.inner, f, a[0], a[1]);
        const gx = (edgeDistance(p.side, p.inner, f, bx[0], bx[1]) - d0) / h;
        const gy = (edgeDistance(p.side, p.inner, f, by[0], by[1]) - d0) / h;
        grad[i] = Math.hypot(gx, gy) || 1;
      });
    },
    at,
    all(t) {
      const r = new Float64Array(pts.length);
      for (let i = 0; i < pts.length; i++) r[i] = at(t, i);
      return r;
    },
  };
}

/** Forward-difference step for parameter k: relative for G's entries, absolute (normalised units) for λ and the biases. */
function parameterStep(theta: readonly number[], k: number): number {
  return k < 8 ? 1e-7 * Math.max(1, Math.abs(theta[k]!)) : 1e-7;
}

/** Jacobian by forward differences, one column per parameter: ∂f/∂θ_k at θ, given f(θ) = `f0`. */
function forwardJacobian(theta: readonly number[], f: (t: readonly number[]) => ArrayLike<number>, f0: ArrayLike<number>): Float64Array[] {
  return theta.map((_, k) => {
    const t2 = [...theta];
    const step = parameterStep(theta, k);
    t2[k]! += step;
    const f1 = f(t2);
    const col = new Float64Array(f0.length);
    for (let i = 0; i < f0.length; i++) col[i] = (f1[i]! - f0[i]!) / step;
    return col;
  });
}

/**
 * Robust weights in place (Huber at 2σ of the MAD, none beyond 5σ; σ at least 0.02 px), from iteration 2 on: at the
 * start a frame's outer and inner edges sit a bias apart either way, which would split them. `r` normalised px.
 */
function setRobustWeights(r: Float64Array, it: number, N: number, w: Float64Array): void {
  const m = r.length;
  const abs = Array.from(r, Math.abs).sort((a, b) => a - b);
  const sMad = Math.max(abs[m >> 1]! * 1.4826, 0.02 / N);
  for (let i = 0; i < m; i++) {
    const a = Math.abs(r[i]!);
    w[i] = it < 2 ? 1 : a > 5 * sMad ? 0 : a > 2 * sMad ? (2 * sMad) / a : 1;
  }
}

/** Residual variance σ² (normalised px²) over the weighted points, for `np` parameters. */
function residualVariance(r: Float64Array, w: Float64Array, np: number): number {
  let sw = 0;
  let ss = 0;
  for (let i = 0; i < r.length; i++) {
    ss += w[i]! * r[i]! ** 2;
    sw += w[i]! > 0 ? 1 : 0;
  }
  return ss / Math.max(1, sw - np);
}

/** Weighted normal equations M = Jᵀ W J, g = −Jᵀ W r with W = w / σ² (M row-major np × np). */
function normalEquations(J: Float64Array[], r: Float64Array, w: Float64Array, sigma2: number): { M: number[]; g: number[] } {
  const np = J.length;
  const M = new Array<number>(np * np).fill(0);
  const g = new Array<number>(np).fill(0);
  for (let i = 0; i < r.length; i++) {
    if (!w[i]) continue;
    const wi = w[i]! / sigma2;
    for (let a = 0; a < np; a++) {
      const ja = J[a]![i]!;
      if (!ja) continue;
      g[a]! -= wi * ja * r[i]!;
      for (let b = 0; b < np; b++) M[a * np + b]! += wi * ja * J[b]![i]!;
    }
  }
  return { M, g };
}

/**
 * Robust Gauss–Newton on θ (updated in place), at most 12 steps: the final weights and the last normal matrix
 * (its inverse is θ's covariance before the correlation factor). Null when the normal matrix is not positive definite.
 */
function gaussNewton(model: EdgeResiduals, theta: number[], N: number): { weights: Float64Array; normal: number[] } | null {
  const np = theta.length;
  const weights = new Float64Array(model.count).fill(1);
  let normal: number[] = [];
  for (let it = 0; it < 12; it++) {
    model.freeze(theta);
    const r = model.all(theta);
    setRobustWeights(r, it, N, weights);
    const sigma2 = residualVariance(r, weights, np);
    const { M, g } = normalEquations(forwardJacobian(theta, (t) => model.all(t), r), r, weights, sigma2);
    normal = M;
    const dx = cholSolve(M, g, np);
    if (!dx) return null;
    for (let k = 0; k < np; k++) theta[k]! += dx[k]!;
    if (it >= 2 && dx.slice(0, 8).every((v, k) => Math.abs(v) < 1e-10 * Math.max(1, Math.abs(theta[k]!))) && Math.abs(dx[8]!) < 1e-10) break;
  }
  return { weights, normal };
}

/**
 * At the solution: points kept (weight > 0), their sum of squared residuals (normalised px²) and the factor by which
 * the residuals' correlation along each edge raises the variance (point-weighted mean of `correlationFactor`).
 */
function residualStatistics(pts: readonly EdgePoint[], w: Float64Array, model: EdgeResiduals, theta: readonly number[]): { used: number; ss: number; inflation: number } {
  model.freeze(theta);
  const byEdge = new Map<number, { k: number; r: number }[]>();
  let used = 0;
  let ss = 0;
  pts.forEach((p, i) => {
    if (!w[i]) return;
    const r = model.at(theta, i);
    used++;
    ss += r * r;
    const l = byEdge.get(p.edge) ?? [];
    l.push({ k: p.k, r });
    byEdge.set(p.edge, l);
  });
  let fSum = 0;
  let fN = 0;
  for (const l of byEdge.values()) {
    l.sort((a, b) => a.k - b.k);
    fSum += correlationFactor(l.map((e) => e.r)) * l.length;
    fN += l.length;
  }
  return { used, ss, inflation: fN ? fSum / fN : 1 };
}

/** The outer corners (image px) under θ: the unit frame's corners through G⁻¹, then distorted by the division model. */
function cornersFromParameters(t: readonly number[], nf: NormalisedFrame): Px[] {
  const H = invertHomography([...t.slice(0, 8), 1] as Mat3);
  return ([[0, 0], [1, 0], [1, 1], [0, 1]] as const).map(([u, v]) => {
    const q = applyH(H, u, v);
    // distorted point p̃ with p̃ / (1 + λ|p̃|²) = q: fixed point p̃ = q (1 + λ|p̃|²)
    let px = q[0];
    let py = q[1];
    for (let k = 0; k < 20; k++) {
      const s = 1 + t[8]! * (px * px + py * py);
      px = q[0] * s;
      py = q[1] * s;
    }
    return [nf.cx + nf.N * px, nf.cy + nf.N * py] as Px;
  });
}

/** Covariance of the corners (x0, y0, …, px², row-major 8 × 8), Σ_c = J Σ_θ Jᵀ with J by forward differences. */
function cornerCovariance(theta: readonly number[], cov: number[], nf: NormalisedFrame, corners: readonly Px[]): number[] {
  const np = theta.length;
  const flat = (c: readonly Px[]) => c.flatMap((p) => [p[0], p[1]]);
  const Jc = forwardJacobian(theta, (t) => flat(cornersFromParameters(t, nf)), flat(corners));
  const cc = new Array<number>(64).fill(0);
  for (let a = 0; a < 8; a++)
    for (let b = 0; b < 8; b++) {
      let s = 0;
      for (let k = 0; k < np; k++) for (let l = 0; l < np; l++) s += Jc[k]![a]! * cov[k * np + l]! * Jc[l]![b]!;
      cc[a * 8 + b] = s;
    }
  return cc;
}

/**
 * Adds to the corners' covariance `cc` (px²) a bias of 1σ = `sigmaPx` common to all edges: every edge moved outward
 * by 1 px moves corner k by d with n₁·d = n₂·d = 1 (n: its two sides' outward unit normals in the image).
 */
function addCommonBias(cc: number[], corners: readonly Px[], sigmaPx: number): void {
  const v: number[] = [];
  for (let k = 0; k < 4; k++) {
    const a = normalAt(corners, (k + 3) % 4);
    const b = normalAt(corners, k);
    const det = a[0] * b[1] - a[1] * b[0];
    v.push((b[1] - a[1]) / det, (a[0] - b[0]) / det);
  }
  for (let a = 0; a < 8; a++) for (let b = 0; b < 8; b++) cc[a * 8 + b]! += sigmaPx ** 2 * v[a]! * v[b]!;
}

/** A frame's four measured side biases (θ₉…θ₁₂ × N, px) and the variance of their mean (px², from their joint covariance). */
function measuredBias(theta: readonly number[], cov: number[], N: number): { biasPx: number[]; meanVarPx2: number } {
  const np = theta.length;
  const nb = 4;
  let vb = 0;
  for (let a = 0; a < nb; a++) for (let b = 0; b < nb; b++) vb += cov[(9 + a) * np + 9 + b]!;
  return { biasPx: [0, 1, 2, 3].map((s) => theta[9 + s]! * N), meanVarPx2: (vb / (nb * nb)) * N * N };
}

/**
 * Fits the square's edge points jointly (see the file header). `guess`: the corners (px) in the order of the
 * sides, e.g. from per-side curves. Returns null when the fit does not converge or is degenerate.
 */
export function fitSquareEdges(edges: SquareEdges, guess: readonly Px[], opts: EdgeFitOptions): SquareEdgeFit | null {
  const nf = normalisedFrameOf(opts);
  const f = edges.frameFraction ?? 0;
  const framed = !!edges.inner && f > 0;
  const pts = normalisedEdgePoints(edges, framed, nf);
  if (pts.length < 40) return null;
  // A plain square's bias cannot be told from its size: it is held at the prior's mean and its 1σ added to the
  // corners afterwards; a frame's four sides' biases are parameters.
  const theta = initialParameters(guess, nf, framed ? 4 : 0);
  if (!theta) return null;
  const prior = framed ? null : opts.biasPrior ?? DEFAULT_BIAS_PRIOR;
  const model = edgeResiduals(pts, f, prior ? prior.meanPx / nf.N : null);
  const solved = gaussNewton(model, theta, nf.N);
  if (!solved) return null;
  const { used, ss, inflation } = residualStatistics(pts, solved.weights, model, theta);
  // a fit that did not settle on the edges (a wrong quad, a bias that ran off) is no measurement
  if (!(used >= 0.6 * pts.length) || !(Math.sqrt(ss / used) * nf.N < 0.5)) return null;
  const cov = invertSym(solved.normal.map((v) => v / inflation), theta.length);
  if (!cov) return null;
  const corners = cornersFromParameters(theta, nf);
  const cc = cornerCovariance(theta, cov, nf, corners);
  if (prior) addCommonBias(cc, corners, prior.sigmaPx);
  const bias = prior ? { biasPx: [0, 0, 0, 0].map(() => prior.meanPx), meanVarPx2: prior.sigmaPx ** 2 } : measuredBias(theta, cov, nf.N);
  return {
    corners: corners as SquareEdgeFit['corners'],
    cornerCovPx2: cc,
    cornerSigmaPx: Math.sqrt(Math.max(0, [0, 1, 2, 3, 4, 5, 6, 7].reduce((s, k) => s + cc[k * 9]!, 0) / 8)),
    biasPx: bias.biasPx,
    biasMeanPx: bias.biasPx.reduce((a, b) => a + b, 0) / 4,
    biasSigmaPx: Math.sqrt(Math.max(0, bias.meanVarPx2)),
    rmsPx: Math.sqrt(ss / Math.max(1, used)) * nf.N,
    inflation,
    lambda: theta[8]!,
    used,
    total: pts.length,
  };
}
