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
 * Fits the square's edge points jointly (see the file header). `guess`: the corners (px) in the order of the
 * sides, e.g. from per-side curves. Returns null when the fit does not converge or is degenerate.
 */
export function fitSquareEdges(edges: SquareEdges, guess: readonly Px[], opts: EdgeFitOptions): SquareEdgeFit | null {
  const cx = opts.width / 2;
  const cy = opts.height / 2;
  const N = Math.max(opts.width, opts.height) / 2;
  const f = edges.frameFraction ?? 0;
  const framed = !!edges.inner && f > 0;
  const pts: EdgePoint[] = [];
  for (let s = 0; s < 4; s++) {
    (edges.outer[s] ?? []).forEach((p, k) => pts.push({ x: (p[0] - cx) / N, y: (p[1] - cy) / N, side: s, inner: false, edge: s, k }));
    if (framed) (edges.inner![s] ?? []).forEach((p, k) => pts.push({ x: (p[0] - cx) / N, y: (p[1] - cy) / N, side: s, inner: true, edge: 4 + s, k }));
  }
  if (pts.length < 40) return null;
  // parameters: G (image → unit frame homography, 8 entries, g33 = 1), λ, and for a frame its four sides' biases
  // (normalised px: bias_px = b · N). A plain square's bias cannot be told from its size: it is held at the prior's
  // mean and its 1σ added to the corners afterwards.
  const nb = framed ? 4 : 0;
  const np = 9 + nb;
  let H0: Mat3;
  try {
    H0 = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], guess.map((p) => [(p[0] - cx) / N, (p[1] - cy) / N] as const));
  } catch {
    return null;
  }
  const G0 = invertHomography(H0);
  const theta = [...G0.slice(0, 8).map((v) => v / G0[8]!), 0, ...new Array<number>(nb).fill(0)];
  const prior = framed ? null : opts.biasPrior ?? DEFAULT_BIAS_PRIOR;
  // signed distance in the unit frame, positive outward (towards the light side for an outer edge)
  const lineD = (side: number, inner: boolean, u: number, v: number) => {
    const a = inner ? f : 0;
    switch (side) {
      case 0: return -(v - a);
      case 1: return u - (1 - a);
      case 2: return v - (1 - a);
      default: return -(u - a);
    }
  };
  const unitOf = (t: readonly number[], x: number, y: number): [number, number] => {
    const k = 1 + t[8]! * (x * x + y * y);
    const qx = x / k;
    const qy = y / k;
    const w = t[6]! * qx + t[7]! * qy + 1;
    return [(t[0]! * qx + t[1]! * qy + t[2]!) / w, (t[3]! * qx + t[4]! * qy + t[5]!) / w];
  };
  // per point: the unit-frame distance's gradient magnitude over image position (normalised), frozen per iteration
  const grad = new Float64Array(pts.length);
  const updateGrad = (t: readonly number[]) => {
    const h = 1e-4;
    pts.forEach((p, i) => {
      const a = unitOf(t, p.x, p.y);
      const bx = unitOf(t, p.x + h, p.y);
      const by = unitOf(t, p.x, p.y + h);
      const d0 = lineD(p.side, p.inner, a[0], a[1]);
      const gx = (lineD(p.side, p.inner, bx[0], bx[1]) - d0) / h;
      const gy = (lineD(p.side, p.inner, by[0], by[1]) - d0) / h;
      grad[i] = Math.hypot(gx, gy) || 1;
    });
  };
  const resid = (t: readonly number[], i: number) => {
    const p = pts[i]!;
    const u = unitOf(t, p.x, p.y);
    const d = lineD(p.side, p.inner, u[0], u[1]) / grad[i]!;
    const b = framed ? t[9 + p.side]! : prior!.meanPx / N;
    return p.inner ? d + b : d - b;
  };
  const w = new Float64Array(pts.length).fill(1);
  let sigma2 = 0;
  let N2: number[] = [];
  const m = pts.length;
  for (let it = 0; it < 12; it++) {
    updateGrad(theta);
    const r = new Float64Array(m);
    for (let i = 0; i < m; i++) r[i] = resid(theta, i);
    // robust weights (Huber at 2σ of the MAD, none beyond 5σ; σ at least 0.02 px), once the biases are near: at
    // the start a frame's outer and inner edges sit a bias apart either way, which would split them
    const abs = Array.from(r, Math.abs).sort((a, b) => a - b);
    const sMad = Math.max(abs[m >> 1]! * 1.4826, 0.02 / N);
    for (let i = 0; i < m; i++) {
      const a = Math.abs(r[i]!);
      w[i] = it < 2 ? 1 : a > 5 * sMad ? 0 : a > 2 * sMad ? (2 * sMad) / a : 1;
    }
    let sw = 0;
    let ss = 0;
    for (let i = 0; i < m; i++) {
      ss += w[i]! * r[i]! ** 2;
      sw += w[i]! > 0 ? 1 : 0;
    }
    sigma2 = ss / Math.max(1, sw - np);
    // numerical Jacobian (forward differences)
    const J = new Float64Array(m * np);
    for (let k = 0; k < np; k++) {
      const t2 = [...theta];
      const step = k < 8 ? 1e-7 * Math.max(1, Math.abs(theta[k]!)) : 1e-7;
      t2[k]! += step;
      for (let i = 0; i < m; i++) J[i * np + k] = (resid(t2, i) - r[i]!) / step;
    }
    const M = new Array<number>(np * np).fill(0);
    const g = new Array<number>(np).fill(0);
    for (let i = 0; i < m; i++) {
      if (!w[i]) continue;
      const wi = w[i]! / sigma2;
      for (let a = 0; a < np; a++) {
        const ja = J[i * np + a]!;
        if (!ja) continue;
        g[a]! -= wi * ja * r[i]!;
        for (let b = 0; b < np; b++) M[a * np + b]! += wi * ja * J[i * np + b]!;
      }
    }
    N2 = M;
    const dx = cholSolve(M, g, np);
    if (!dx) return null;
    for (let k = 0; k < np; k++) theta[k]! += dx[k]!;
    if (it >= 2 && dx.slice(0, 8).every((v, k) => Math.abs(v) < 1e-10 * Math.max(1, Math.abs(theta[k]!))) && Math.abs(dx[8]!) < 1e-10) break;
  }
  // correlation of the residuals along each edge raises the variance
  updateGrad(theta);
  const byEdge = new Map<number, { k: number; r: number }[]>();
  let used = 0;
  let ss = 0;
  pts.forEach((p, i) => {
    if (!w[i]) return;
    const r = resid(theta, i);
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
  const inflation = fN ? fSum / fN : 1;
  // a fit that did not settle on the edges (a wrong quad, a bias that ran off) is no measurement
  if (!(used >= 0.6 * m) || !(Math.sqrt(ss / used) * N < 0.5)) return null;
  const M = N2.map((v) => v / inflation);
  const cov = invertSym(M, np);
  if (!cov) return null;
  const cornersOf = (t: readonly number[]): Px[] => {
    const G = [...t.slice(0, 8), 1] as Mat3;
    const H = invertHomography(G);
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
      return [cx + N * px, cy + N * py] as Px;
    });
  };
  const c0 = cornersOf(theta);
  const Jc: number[][] = [];
  for (let k = 0; k < np; k++) {
    const t2 = [...theta];
    const step = k < 8 ? 1e-7 * Math.max(1, Math.abs(theta[k]!)) : 1e-7;
    t2[k]! += step;
    const c = cornersOf(t2);
    Jc.push(c.flatMap((p, i) => [(p[0] - c0[i]![0]) / step, (p[1] - c0[i]![1]) / step]));
  }
  const cc = new Array<number>(64).fill(0);
  for (let a = 0; a < 8; a++)
    for (let b = 0; b < 8; b++) {
      let s = 0;
      for (let k = 0; k < np; k++) for (let l = 0; l < np; l++) s += Jc[k]![a]! * cov[k * np + l]! * Jc[l]![b]!;
      cc[a * 8 + b] = s;
    }
  if (prior) {
    // every edge moved outward by 1 px moves corner k by d with n₁·d = n₂·d = 1 (n: its two sides' outward unit
    // normals in the image); a bias of 1σ does that, to all four corners together
    const v: number[] = [];
    for (let k = 0; k < 4; k++) {
      const a = normalAt(c0, (k + 3) % 4);
      const b = normalAt(c0, k);
      const det = a[0] * b[1] - a[1] * b[0];
      v.push((b[1] - a[1]) / det, (a[0] - b[0]) / det);
    }
    for (let a = 0; a < 8; a++) for (let b = 0; b < 8; b++) cc[a * 8 + b]! += prior.sigmaPx ** 2 * v[a]! * v[b]!;
  }
  const biasPx = framed ? [0, 1, 2, 3].map((s) => theta[9 + s]! * N) : [0, 0, 0, 0].map(() => prior!.meanPx);
  // the mean bias and its 1σ (from the biases' joint covariance, or the prior)
  let vb = 0;
  for (let a = 0; a < nb; a++) for (let b = 0; b < nb; b++) vb += cov[(9 + a) * np + 9 + b]!;
  vb = framed ? (vb / (nb * nb)) * N * N : prior!.sigmaPx ** 2;
  return {
    corners: c0 as SquareEdgeFit['corners'],
    cornerCovPx2: cc,
    cornerSigmaPx: Math.sqrt(Math.max(0, [0, 1, 2, 3, 4, 5, 6, 7].reduce((s, k) => s + cc[k * 9]!, 0) / 8)),
    biasPx,
    biasMeanPx: biasPx.reduce((a, b) => a + b, 0) / 4,
    biasSigmaPx: Math.sqrt(Math.max(0, vb)),
    rmsPx: Math.sqrt(ss / Math.max(1, used)) * N,
    inflation,
    lambda: theta[8]!,
    used,
    total: m,
  };
}
