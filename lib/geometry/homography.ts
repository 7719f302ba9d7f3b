/**
 * Plane-to-plane homography: normalised direct linear transform (Hartley & Zisserman, Multiple View Geometry,
 * 2nd ed., alg. 4.2) followed by a Gauss–Newton/Levenberg–Marquardt refinement of the transfer error in the
 * destination plane; the exact four-point case, the inverse and the local scale. Frames are the caller's: `src`
 * and `dst` are any two planar frames (e.g. bed mm → image px, reference-square mm → image px); H maps src to dst
 * in homogeneous coordinates, row-major, scaled so H[8] = 1.
 */
import { levenbergMarquardt } from './levenberg-marquardt';
import { applyH, mat3Inv, mat3Mul, normaliseH, smallestEigenvector, type Mat3 } from './linalg';

export { applyH, type Mat3 };
export type Pt = readonly [number, number];

/** Similarity that moves points' centroid to 0 and their mean distance to √2 (Hartley normalisation). */
export function normalisingTransform(pts: readonly Pt[], weights?: ArrayLike<number>): Mat3 {
  let sw = 0, mx = 0, my = 0;
  pts.forEach((p, i) => { const w = weights ? weights[i]! : 1; sw += w; mx += w * p[0]; my += w * p[1]; });
  mx /= sw; my /= sw;
  let d = 0;
  pts.forEach((p, i) => { d += (weights ? weights[i]! : 1) * Math.hypot(p[0] - mx, p[1] - my); });
  d /= sw;
  const s = d > 0 ? Math.SQRT2 / d : 1;
  return [s, 0, -s * mx, 0, s, -s * my, 0, 0, 1];
}

/** Normalised DLT from ≥ 4 correspondences (optionally weighted). */
export function homographyDlt(src: readonly Pt[], dst: readonly Pt[], weights?: ArrayLike<number>): Mat3 {
  const n = src.length;
  if (n < 4 || dst.length !== n) throw new RangeError('homography needs at least 4 point pairs');
  const ts = normalisingTransform(src, weights), td = normalisingTransform(dst, weights);
  const ata = new Float64Array(81);
  const r = new Float64Array(9);
  const addRow = (w: number) => {
    for (let i = 0; i < 9; i++) { const ri = r[i]!; if (ri === 0) continue; for (let j = 0; j < 9; j++) ata[i * 9 + j]! += w * ri * r[j]!; }
  };
  for (let k = 0; k < n; k++) {
    const w = weights ? weights[k]! : 1;
    if (!(w > 0)) continue;
    const [x, y] = applyH(ts, src[k]![0], src[k]![1]);
    const [u, v] = applyH(td, dst[k]![0], dst[k]![1]);
    r.set([-x, -y, -1, 0, 0, 0, u * x, u * y, u]); addRow(w);
    r.set([0, 0, 0, -x, -y, -1, v * x, v * y, v]); addRow(w);
  }
  const h = Array.from(smallestEigenvector(ata, 9)) as Mat3;
  return normaliseH(mat3Mul(mat3Inv(td), mat3Mul(h, ts)));
}

/**
 * Refines H by minimising Σ wᵢ‖H(srcᵢ) − dstᵢ‖² (transfer error in the destination frame) with
 * Levenberg–Marquardt (levenberg-marquardt.ts) over the 8 free entries, in Hartley-normalised coordinates.
 */
export function refineHomography(h0: Mat3, src: readonly Pt[], dst: readonly Pt[], weights?: ArrayLike<number>, iterations = 10): Mat3 {
  const ts = normalisingTransform(src), td = normalisingTransform(dst);
  const sx = src.map((p) => applyH(ts, p[0], p[1]));
  const dx = dst.map((p) => applyH(td, p[0], p[1]));
  const start = normaliseH(mat3Mul(td, mat3Mul(h0, mat3Inv(ts))));
  const h8 = start[8];
  const asH = (t: Float64Array): Mat3 => [t[0]!, t[1]!, t[2]!, t[3]!, t[4]!, t[5]!, t[6]!, t[7]!, h8];
  const jtj = new Float64Array(64), jtr = new Float64Array(8);
  const ju = new Float64Array(8), jv = new Float64Array(8);
  const theta = Float64Array.from(start.slice(0, 8));
  levenbergMarquardt({
    n: 8,
    cost: (t) => {
      const hh = asH(t);
      let c = 0;
      for (let k = 0; k < sx.length; k++) {
        const [u, v] = applyH(hh, sx[k]![0], sx[k]![1]);
        c += (weights ? weights[k]! : 1) * ((u - dx[k]![0]) ** 2 + (v - dx[k]![1]) ** 2);
      }
      return c;
    },
    normalEquations: (t) => {
      const h = asH(t);
      jtj.fill(0); jtr.fill(0);
      for (let k = 0; k < sx.length; k++) {
        const w = weights ? weights[k]! : 1;
        if (!(w > 0)) continue;
        const [x, y] = sx[k]!;
        const den = h[6] * x + h[7] * y + h[8];
        const u = (h[0] * x + h[1] * y + h[2]) / den, v = (h[3] * x + h[4] * y + h[5]) / den;
        ju.set([x / den, y / den, 1 / den, 0, 0, 0, (-u * x) / den, (-u * y) / den]);
        jv.set([0, 0, 0, x / den, y / den, 1 / den, (-v * x) / den, (-v * y) / den]);
        const ru = u - dx[k]![0], rv = v - dx[k]![1];
        for (let i = 0; i < 8; i++) {
          jtr[i]! += w * (ju[i]! * ru + jv[i]! * rv);
          for (let j = 0; j < 8; j++) jtj[i * 8 + j]! += w * (ju[i]! * ju[j]! + jv[i]! * jv[j]!);
        }
      }
      return { jtj, jtr };
    },
  }, theta, { maxIterations: iterations, lambda: 1e-3, minRelativeGain: 1e-14 });
  return normaliseH(mat3Mul(mat3Inv(td), mat3Mul(asH(theta), ts)));
}

/**
 * The homography mapping the four points `src[i]` exactly onto `dst[i]` (normalised DLT with four pairs).
 * Throws a RangeError when either quadrilateral is degenerate (three points collinear, or a point repeated).
 */
export function homographyFrom4(src: readonly Pt[], dst: readonly Pt[]): Mat3 {
  if (src.length !== 4 || dst.length !== 4) throw new RangeError('homographyFrom4 needs exactly 4 point pairs');
  if (hasCollinearTriple(src) || hasCollinearTriple(dst)) throw new RangeError('degenerate homography: three of the four points are collinear');
  const h = homographyDlt(src, dst);
  if (!h.every(Number.isFinite)) throw new RangeError('degenerate homography');
  return h;
}

/** True when some three of the points are collinear to within 1e-9 of the squared spread (scale-free). */
function hasCollinearTriple(p: readonly Pt[]): boolean {
  let spread = 0;
  for (let i = 0; i < p.length; i++) for (let j = i + 1; j < p.length; j++) spread = Math.max(spread, (p[i]![0] - p[j]![0]) ** 2 + (p[i]![1] - p[j]![1]) ** 2);
  if (!(spread > 0)) return true;
  for (let i = 0; i < p.length; i++)
    for (let j = i + 1; j < p.length; j++)
      for (let k = j + 1; k < p.length; k++) {
        const cross = (p[j]![0] - p[i]![0]) * (p[k]![1] - p[i]![1]) - (p[j]![1] - p[i]![1]) * (p[k]![0] - p[i]![0]);
        if (Math.abs(cross) <= 1e-9 * spread) return true;
      }
  return false;
}

/** The inverse mapping dst → src, scaled so H[8] = 1. */
export function invertHomography(h: Mat3): Mat3 {
  return normaliseH(mat3Inv(h));
}

/** Local linear scale of the mapping at (x, y): √|det J|, destination units per source unit (e.g. px per mm). */
export function homographyScale(h: Mat3, x: number, y: number): number {
  const [a, b, c, d] = homographyJacobian(h, x, y);
  return Math.sqrt(Math.abs(a * d - b * c));
}

/** DLT then refinement. */
export function fitHomography(src: readonly Pt[], dst: readonly Pt[], weights?: ArrayLike<number>): Mat3 {
  const h = homographyDlt(src, dst, weights);
  return src.length > 4 ? refineHomography(h, src, dst, weights) : h;
}

/** Jacobian of the homography mapping at (x, y): [[du/dx, du/dy], [dv/dx, dv/dy]]. */
export function homographyJacobian(h: Mat3, x: number, y: number): [number, number, number, number] {
  const w = h[6] * x + h[7] * y + h[8];
  const u = (h[0] * x + h[1] * y + h[2]) / w, v = (h[3] * x + h[4] * y + h[5]) / w;
  return [(h[0] - u * h[6]) / w, (h[1] - u * h[7]) / w, (h[3] - v * h[6]) / w, (h[4] - v * h[7]) / w];
}
