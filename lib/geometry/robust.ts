/**
 * Robust estimation helpers: median / MAD scale, Huber and Tukey weights for iteratively reweighted least
 * squares, and a seeded RANSAC loop. Unit-free: residuals are in whatever unit the caller fits.
 */
import { mulberry32 } from './random';

/** k-th smallest (0-based) of a, reordering a in place (Hoare's selection, expected O(n)). */
function select(a: Float64Array, k: number): number {
  let lo = 0, hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1]!;
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) { const t = a[i]!; a[i] = a[j]!; a[j] = t; i++; j--; }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k]!;
  }
  return a[k]!;
}

export function median(values: ArrayLike<number>): number {
  return medianInPlace(Float64Array.from(values));
}

/** Median of a, reordering a in place. */
function medianInPlace(a: Float64Array): number {
  const n = a.length;
  if (n === 0) return NaN;
  if (n % 2) return select(a, (n - 1) / 2);
  const hi = select(a, n / 2);
  let lo = -Infinity;
  for (let i = 0; i < n / 2; i++) if (a[i]! > lo) lo = a[i]!;
  return (lo + hi) / 2;
}

/** Robust σ from the median absolute deviation about zero (for residuals centred on 0): 1.4826·median|r|. */
export function madSigma(residuals: ArrayLike<number>): number {
  const a = new Float64Array(residuals.length);
  for (let i = 0; i < a.length; i++) a[i] = Math.abs(residuals[i]!);
  return 1.4826 * medianInPlace(a);
}

/** Huber weight for a residual r at threshold k (same unit): 1 inside, k/|r| outside. */
export const huberWeight = (r: number, k: number): number => (Math.abs(r) <= k ? 1 : k / Math.abs(r));

/** Tukey biweight for residual r at cut-off c: (1 − (r/c)²)² inside, 0 outside. */
export const tukeyWeight = (r: number, c: number): number => (Math.abs(r) >= c ? 0 : (1 - (r / c) ** 2) ** 2);

/** Random draws allowed per index of a minimal sample before the sample is given up. */
export const RANSAC_DRAWS_PER_INDEX = 64;
/** Most RANSAC iterations a caller may ask for. */
export const MAX_RANSAC_ITERATIONS = 10_000;

export interface RansacResult<M> { model: M; inliers: number[] }

/**
 * RANSAC: draws minimal samples of `sampleSize` indices (seeded), fits `fit`, counts residuals below
 * `threshold`, keeps the largest consensus and refits on it.
 */
export function ransac<M>(n: number, sampleSize: number, fit: (idx: number[]) => M | null, residual: (m: M, i: number) => number, threshold: number, opts: { iterations?: number; seed?: number } = {}): RansacResult<M> | null {
  if (n < sampleSize) return null;
  const rand = mulberry32(opts.seed ?? 1);
  let best: RansacResult<M> | null = null;
  const iterations = Math.min(opts.iterations ?? 200, MAX_RANSAC_ITERATIONS);
  for (let it = 0; it < iterations; it++) {
    const idx = new Set<number>();
    // distinct indices; at most RANSAC_DRAWS_PER_INDEX draws each (a sample short of them is skipped)
    for (let draws = 0; idx.size < sampleSize && draws < RANSAC_DRAWS_PER_INDEX * sampleSize; draws++) idx.add(Math.floor(rand() * n));
    if (idx.size < sampleSize) continue;
    const m = fit([...idx]);
    if (!m) continue;
    const inl: number[] = [];
    for (let i = 0; i < n; i++) if (residual(m, i) < threshold) inl.push(i);
    if (!best || inl.length > best.inliers.length) best = { model: m, inliers: inl };
  }
  if (!best || best.inliers.length < sampleSize) return null;
  const refit = fit(best.inliers);
  if (!refit) return best;
  const inl: number[] = [];
  for (let i = 0; i < n; i++) if (residual(refit, i) < threshold) inl.push(i);
  return { model: refit, inliers: inl };
}
