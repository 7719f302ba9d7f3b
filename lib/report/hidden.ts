/**
 * Why a position was not seen, in words for the report's views (page, shared page, PDF, CSV, mail). A position is
 * hidden when the reference sheet lies over it or its rim, the photo's border cuts it, or something on the bed covers
 * part of it (lib/geometry/contract.ts HIDDEN_REASONS); it is then not measured, neither in nor out.
 */
import type { HiddenReason, ReportPosition } from '@/lib/geometry/contract';

/** Short words per reason, to follow "not seen: ". */
export const HIDDEN_WORDS: Record<HiddenReason, string> = {
  sheet: 'under the reference sheet or at its edge',
  border: 'cut by the edge of the photo',
  occluded: 'partly covered by something on the bed',
};

/** The reason a hidden position was not seen, in words; null for a position that is not hidden. */
export function hiddenWords(p: Pick<ReportPosition, 'hidden' | 'hiddenBy'>): string | null {
  if (!p.hidden) return null;
  // reports made before the reason existed hid only what lay under the printed square
  return p.hiddenBy ? HIDDEN_WORDS[p.hiddenBy] : 'under the reference square';
}
