/**
 * Least-squares similarity and rigid transforms between two point sets of the same frame dimension
 * (Umeyama 1991, "Least-squares estimation of transformation parameters between two point patterns",
 * IEEE PAMI 13(4)), with the reflection correction S = diag(1, …, 1, −1) when det(U)det(V) < 0.
 * y ≈ c R x + t. Units are the caller's (both sets in one unit).
 */
import { Matrix, SingularValueDecomposition, determinant } from 'ml-matrix';

export interface Similarity { c: number; R: number[][]; t: number[] }

/** Umeyama's method; `withScale: false` gives the rigid fit (c = 1). Optional weights. */
export function umeyama(x: readonly (readonly number[])[], y: readonly (readonly number[])[], opts: { withScale?: boolean; weights?: ArrayLike<number> } = {}): Similarity {
  const n = x.length;
  if (n < 2 || y.length !== n) throw new RangeError('umeyama needs at least 2 point pairs of equal count');
  const d = x[0]!.length;
  const w = (i: number) => (opts.weights ? opts.weights[i]! : 1);
  let sw = 0;
  const mx = new Array(d).fill(0), my = new Array(d).fill(0);
  for (let i = 0; i < n; i++) { sw += w(i); for (let k = 0; k < d; k++) { mx[k]! += w(i) * x[i]![k]!; my[k]! += w(i) * y[i]![k]!; } }
  for (let k = 0; k < d; k++) { mx[k] /= sw; my[k] /= sw; }
  let varX = 0;
  const cov = Matrix.zeros(d, d);
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < d; a++) {
      const xa = x[i]![a]! - mx[a];
      varX += (w(i) * xa * xa) / sw;
      for (let b = 0; b < d; b++) cov.set(b, a, cov.get(b, a) + (w(i) * (y[i]![b]! - my[b]) * xa) / sw);
    }
  }
  const svd = new SingularValueDecomposition(cov);
  const U = svd.leftSingularVectors, V = svd.rightSingularVectors, D = svd.diagonal;
  const S = Matrix.eye(d, d);
  if (determinant(U) * determinant(V) < 0) S.set(d - 1, d - 1, -1);
  const R = U.mmul(S).mmul(V.transpose());
  let trDS = 0;
  for (let k = 0; k < d; k++) trDS += D[k]! * S.get(k, k);
  const c = opts.withScale === false ? 1 : trDS / varX;
  const t = my.map((m, k) => m - c * R.getRow(k).reduce((s, r, j) => s + r * mx[j], 0));
  return { c, R: R.to2DArray(), t };
}

/** 2-D rigid transform: rotation angle (rad, counter-clockwise) and translation. */
export interface Rigid2 { angleRad: number; tx: number; ty: number }

/** Fast 2-D weighted rigid fit y ≈ R(θ) x + t (the 2-D closed form of Umeyama's rigid case). */
export function rigid2(x: ArrayLike<number>, y: ArrayLike<number>, n: number, weights?: ArrayLike<number>): Rigid2 {
  let sw = 0, mx0 = 0, mx1 = 0, my0 = 0, my1 = 0;
  for (let i = 0; i < n; i++) { const w = weights ? weights[i]! : 1; sw += w; mx0 += w * x[2 * i]!; mx1 += w * x[2 * i + 1]!; my0 += w * y[2 * i]!; my1 += w * y[2 * i + 1]!; }
  mx0 /= sw; mx1 /= sw; my0 /= sw; my1 /= sw;
  let sc = 0, ss = 0;
  for (let i = 0; i < n; i++) {
    const w = weights ? weights[i]! : 1;
    const a0 = x[2 * i]! - mx0, a1 = x[2 * i + 1]! - mx1, b0 = y[2 * i]! - my0, b1 = y[2 * i + 1]! - my1;
    sc += w * (a0 * b0 + a1 * b1); ss += w * (a0 * b1 - a1 * b0);
  }
  const th = Math.atan2(ss, sc), c = Math.cos(th), s = Math.sin(th);
  return { angleRad: th, tx: my0 - (c * mx0 - s * mx1), ty: my1 - (s * mx0 + c * mx1) };
}
