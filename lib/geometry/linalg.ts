/**
 * Small dense linear algebra for the measurement core: symmetric positive-definite solves and inverses
 * (Cholesky), 3×3 matrix helpers for homographies. Pure numbers, no frames or units of its own.
 */

/** Row-major 3×3 matrix. */
export type Mat3 = [number, number, number, number, number, number, number, number, number];

export function mat3Mul(a: Mat3, b: Mat3): Mat3 {
  const r = new Array(9).fill(0) as Mat3;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) r[i * 3 + j] = a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!;
  return r;
}

export function mat3Inv(m: Mat3): Mat3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!Number.isFinite(det) || Math.abs(det) < 1e-300) throw new Error('singular 3x3 matrix');
  const inv: Mat3 = [A, -(b * i - c * h), b * f - c * e, B, a * i - c * g, -(a * f - c * d), C, -(a * h - b * g), a * e - b * d];
  return inv.map((v) => v / det) as Mat3;
}

/** Applies a homography to (x, y). */
export function applyH(h: Mat3, x: number, y: number): [number, number] {
  const w = h[6] * x + h[7] * y + h[8];
  return [(h[0] * x + h[1] * y + h[2]) / w, (h[3] * x + h[4] * y + h[5]) / w];
}

/** Scales a homography so that h[8] = 1 (or its Frobenius norm to 1 when h[8] ≈ 0). */
export function normaliseH(h: Mat3): Mat3 {
  const s = Math.abs(h[8]) > 1e-12 ? h[8] : Math.hypot(...h);
  return h.map((v) => v / s) as Mat3;
}

/**
 * Cholesky factorisation of a symmetric positive-definite n×n matrix (row-major Float64Array), in place
 * into its lower triangle. Returns false if the matrix is not positive definite.
 */
export function cholesky(a: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    let s = a[j * n + j]!;
    for (let k = 0; k < j; k++) s -= a[j * n + k]! * a[j * n + k]!;
    if (!(s > 0)) return false;
    const d = Math.sqrt(s);
    a[j * n + j] = d;
    for (let i = j + 1; i < n; i++) {
      let t = a[i * n + j]!;
      for (let k = 0; k < j; k++) t -= a[i * n + k]! * a[j * n + k]!;
      a[i * n + j] = t / d;
    }
  }
  return true;
}

/** Solves L Lᵀ x = b given the lower-triangular factor from `cholesky`. */
export function choleskySolve(l: Float64Array, n: number, b: Float64Array): Float64Array {
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[i * n + k]! * y[k]!;
    y[i] = s / l[i * n + i]!;
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= l[k * n + i]! * x[k]!;
    x[i] = s / l[i * n + i]!;
  }
  return x;
}

/** Inverse of an SPD matrix (row-major n×n), or null if it is not SPD. */
export function invertSpd(a: Float64Array, n: number): Float64Array | null {
  const l = Float64Array.from(a);
  if (!cholesky(l, n)) return null;
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    const col = choleskySolve(l, n, e);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i]!;
  }
  return inv;
}

/** Eigenvector of the smallest eigenvalue of a symmetric n×n matrix (Jacobi rotations; n small). */
export function smallestEigenvector(sym: Float64Array, n: number): Float64Array {
  const a = Float64Array.from(sym);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0, diag = 0;
    for (let p = 0; p < n; p++) { diag += a[p * n + p]! ** 2; for (let q = p + 1; q < n; q++) off += a[p * n + q]! ** 2; }
    if (off <= 1e-28 * diag || off < 1e-300) break;
    for (let p = 0; p < n; p++)
      for (let q = p + 1; q < n; q++) {
        const apq = a[p * n + q]!;
        if (Math.abs(apq) < 1e-300) continue;
        const theta = (a[q * n + q]! - a[p * n + p]!) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1), s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k * n + p]!, akq = a[k * n + q]!;
          a[k * n + p] = c * akp - s * akq;
          a[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p * n + k]!, aqk = a[q * n + k]!;
          a[p * n + k] = c * apk - s * aqk;
          a[q * n + k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p]!, vkq = v[k * n + q]!;
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
  }
  let best = 0;
  for (let i = 1; i < n; i++) if (a[i * n + i]! < a[best * n + best]!) best = i;
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = v[k * n + best]!;
  return out;
}
