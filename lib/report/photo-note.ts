/**
 * The plain note a report carries when the photo it was measured from had problems (the photo-quality stage's
 * issues, report contract `photo.quality`): which problems, and that the figures carry them. Pure; the report page,
 * the shared page and the PDF say the same words. Names only, no figure of the photo (a shared page shows none).
 */
import type { PhotoIssueCode, PhotoQuality } from '@/lib/geometry/contract';

/** Each issue in a few words, as the note lists them. */
export const ISSUE_WORDS: Record<PhotoIssueCode, string> = {
  blurred: 'blur (out of focus)',
  'motion-blur': 'camera shake',
  overexposed: 'over-exposure',
  underexposed: 'under-exposure',
  'target-small': 'a reference square too small in the frame',
  'holes-small': 'holes too small in the frame',
  tilted: 'a slanted view',
  'target-cut': 'the reference square cut by the border',
  'bed-cut': 'the bed running off the frame',
};

/** The note, or null when the photo had no problem (or the report predates the quality stage). */
export function photoNote(q: PhotoQuality | null | undefined): string | null {
  if (!q || !q.issues.length) return null;
  const names = q.issues.map((i) => ISSUE_WORDS[i.code]);
  const list = names.length === 1 ? names[0] : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
  return `Measured from a photo with ${names.length === 1 ? 'a problem' : 'problems'}: ${list}. These figures carry ${names.length === 1 ? 'it' : 'them'}; take a better photo before you move or remachine anything on them.`;
}
