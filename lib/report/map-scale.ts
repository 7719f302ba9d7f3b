/**
 * The arrow scale of a check: how much its deviation map multiplies each arrow, computed once here and used by
 * every surface (web report, shared page, PDF, mail image), each printing it as `arrowScaleWords`. A map of a bed is metres wide and its deviations are
 * tenths of a millimetre, so arrows are drawn `exaggeration` times their true length. The automatic choice
 * makes the typical arrow (the 90th percentile of the deviations, so one wild position does not shrink all
 * the others) about 70 % of the spacing between neighbouring positions, rounded down to a 1-2-5 step, and
 * never so large that the longest arrow spans more than three spacings. Lengths in mm.
 */
import type { Report } from '@/lib/geometry/contract';
import { nearestSpacing, niceFactor } from './map';

/** The q-quantile (0…1) of the values by linear interpolation between order statistics (Hyndman & Fan type 7). */
export function quantile(values: readonly number[], q: number): number {
  const v = values.filter(Number.isFinite).slice().sort((a, b) => a - b);
  if (v.length === 0) return Number.NaN;
  const h = (v.length - 1) * Math.min(1, Math.max(0, q));
  const lo = Math.floor(h), hi = Math.ceil(h);
  return v[lo]! + (h - lo) * (v[hi]! - v[lo]!);
}

/**
 * @param deviationsMm radial deviations of the measured positions, mm
 * @param spacingMm nearest spacing between positions, mm
 */
export function autoExaggeration(deviationsMm: readonly number[], spacingMm: number): number {
  const typical = quantile(deviationsMm, 0.9);
  const max = Math.max(0, ...deviationsMm.filter(Number.isFinite));
  if (!(typical > 0) || !(spacingMm > 0)) return 100;
  let x = niceFactor((0.7 * spacingMm) / typical);
  while (x > 1 && max * x > 3 * spacingMm) x = niceFactor(x * 0.99);
  return Math.max(1, x);
}

/** The arrow scale of a report's deviation map: from its positions' deviations and their nearest spacing. */
export function reportArrowScale(report: Pick<Report, 'positions'>): number {
  return autoExaggeration(report.positions.flatMap((p) => (p.deviation ? [p.deviation.r] : [])), nearestSpacing(report.positions));
}
