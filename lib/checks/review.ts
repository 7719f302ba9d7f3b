/**
 * When a finished fit should be looked at by a person before it is trusted. A check is flagged when fewer
 * than half of the pattern's visible positions (not under the reference sheet) were matched, or when there are more unmatched detections than
 * matched ones (a different bed, a wrong pattern or many false holes). Thresholds are ours (common practice
 * for a robust fit: a consensus below one half is not a consensus).
 */
import type { Report } from '@/lib/geometry/contract';

/** The reason the report needs review, in words for the machinist, or null when it can be trusted. */
export function needsReview(report: Report): string | null {
  // positions under the reference sheet are expected to be unseen
  const total = report.positions.filter((p) => !p.hidden).length;
  const matched = report.summary.matched;
  const unmatched = report.unmatched.length;
  if (total > 0 && matched < total / 2) {
    return `Only ${matched} of ${total} positions were matched; check the square's corners and the holes in review.`;
  }
  if (unmatched > matched) {
    return `${unmatched} detected holes match no position of the pattern (${matched} do); check that this is the right bed and pattern.`;
  }
  return null;
}
