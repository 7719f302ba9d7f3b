/**
 * Words for the photo-quality verdict (report contract `PhotoQuality`): the accuracy the photo can reach and what
 * it is good for. Pure; the status page, the report note and the tests share it.
 *
 * "±" is twice the predicted 1σ (about 95 % of positions within it). A clearance is judged well when the
 * measurement's ± is at most a quarter of it: the 4:1 ratio of measurement uncertainty to tolerance (common
 * practice in calibration, from memory: ANSI/NCSL Z540.3's test uncertainty ratio).
 */
import type { PhotoQuality } from '@/lib/geometry/contract';

/** Measurement ± to tolerance: at most a quarter (common practice, 4:1). */
export const UNCERTAINTY_RATIO = 4;

const mm = (v: number) => (v >= 0.1 ? v.toFixed(2) : v >= 0.01 ? v.toFixed(3) : '0.01');

/** ± of a position, mm (2σ), and the smallest clearance it judges well, mm. */
export function positionReach(q: PhotoQuality): { plusMinusMm: number; clearanceMm: number } | null {
  if (!q.predicted) return null;
  const pm = 2 * q.predicted.positionMm;
  return { plusMinusMm: pm, clearanceMm: UNCERTAINTY_RATIO * pm };
}

/** The one-line verdict: good, or how many problems; and what the photo can judge. */
export function qualityHeadline(q: PhotoQuality): string {
  const reach = positionReach(q);
  if (!reach) return 'This photo cannot be measured.';
  const can = `This photo can judge positions to ± ${mm(reach.plusMinusMm)} mm: good for clearances of ${mm(reach.clearanceMm)} mm and more`;
  if (!q.issues.length) return `${can}.`;
  return `${can}, if its ${q.issues.length === 1 ? 'problem does' : `${q.issues.length} problems do`} not spoil it.`;
}

/** The overall size's reach, ppm (2σ) in words. */
export function scaleLine(q: PhotoQuality): string | null {
  if (!q.predicted) return null;
  const ppm = 2 * q.predicted.scalePpm;
  return `Overall size to ± ${Math.max(1, Math.round(ppm))} ppm (± ${(ppm * 1e-3).toFixed(2)} mm per metre) from the reference square.`;
}
