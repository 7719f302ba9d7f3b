/**
 * Histogram of deviations (radial distance r of each measured position from its nominal place, mm): bins of
 * one width from 0, the width a 1-2-5 step chosen so the bins cover the data and the tolerance in at most
 * `maxBins` bins. A value on a bin's edge goes into the upper bin (bins are [from, to)), except the last bin,
 * which also holds its upper edge.
 */

export interface Bin {
  /** Lower edge, mm (inclusive). */
  fromMm: number;
  /** Upper edge, mm (exclusive except for the last bin). */
  toMm: number;
  count: number;
}

/** The smallest of 1, 2 or 5 × 10^k that is ≥ x (x > 0). */
export function niceStepAtLeast(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 1;
  const e = Math.pow(10, Math.floor(Math.log10(x)));
  for (const m of [1, 2, 5, 10]) if (m * e >= x * (1 - 1e-12)) return m * e;
  return 10 * e;
}

/**
 * Bins the deviations.
 * @param valuesMm deviations, mm (non-finite values are ignored)
 * @param opts maxBins (default 12); coverMm: also cover up to this value (e.g. the largest tolerance)
 */
export function binDeviations(valuesMm: readonly number[], opts: { maxBins?: number; coverMm?: number } = {}): Bin[] {
  const vals = valuesMm.filter((v) => Number.isFinite(v) && v >= 0);
  const maxBins = Math.max(1, Math.floor(opts.maxBins ?? 12));
  const top = Math.max(0, ...vals, opts.coverMm ?? 0);
  if (top === 0) return vals.length ? [{ fromMm: 0, toMm: 0.01, count: vals.length }] : [];
  const width = niceStepAtLeast(top / maxBins);
  let n = Math.ceil(top / width - 1e-9);
  n = Math.max(1, Math.min(n, maxBins));
  const bins: Bin[] = Array.from({ length: n }, (_, i) => ({ fromMm: round(i * width), toMm: round((i + 1) * width), count: 0 }));
  for (const v of vals) {
    let i = Math.floor(v / width + 1e-9);
    if (i >= n) i = n - 1;
    bins[i]!.count++;
  }
  return bins;
}

const round = (v: number) => Number(v.toPrecision(12));
