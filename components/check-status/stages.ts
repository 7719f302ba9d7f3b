/**
 * Words for a check's state on the status page: the worker's stages (lib/checks/run-analysis.ts STAGES) in
 * our own phrasing, and whether polling may stop. Pure; the tests and the page share it.
 */
import type { PhotoQuality } from '@/lib/geometry/contract';

export type CheckStatusName = 'queued' | 'running' | 'needs-review' | 'done' | 'failed';

export interface CheckStatusView {
  id: string;
  bedId: string;
  status: CheckStatusName | string;
  stage: string | null;
  progress: number | null;
  error?: string;
  verdict: string | null;
  createdAt: number;
  finishedAt: number | null;
  /** The photo-quality verdict, once measured (before the holes). */
  quality?: PhotoQuality;
  /** True once the check has detections that review can edit (its corners and holes). */
  hasDetections?: boolean;
}

const STAGE_WORDS: Record<string, string> = {
  'reading photo': 'Reading the photo',
  'finding square': 'Finding the reference square',
  'finding holes': 'Finding the holes',
  fitting: 'Fitting the holes to the pattern',
};

/** True once the check will not change by itself (poll no more). */
export const isSettled = (status: string): boolean => status === 'done' || status === 'failed' || status === 'needs-review';

/** The line shown beside the progress bar. */
export function stageWords(view: Pick<CheckStatusView, 'status' | 'stage'>): string {
  if (view.status === 'queued') return 'Waiting for a free worker';
  if (view.status === 'running') return (view.stage && STAGE_WORDS[view.stage]) ?? (view.stage ? `Working: ${view.stage}` : 'Starting');
  if (view.status === 'done') return 'Measured';
  if (view.status === 'needs-review') return 'Measured — a person should look before trusting it';
  if (view.status === 'failed') return 'Could not measure this photo';
  return view.status;
}

/** Progress as a whole percentage for the bar: 0 while queued, 100 once settled. */
export function progressPercent(view: Pick<CheckStatusView, 'status' | 'progress'>): number {
  if (isSettled(view.status)) return 100;
  if (view.status === 'queued') return 0;
  const p = typeof view.progress === 'number' && Number.isFinite(view.progress) ? view.progress : 0;
  return Math.max(0, Math.min(99, Math.round(p * 100)));
}

/** How often to ask the server again, ms, or false to stop. Quick at first, gentler for a long wait. */
export function pollInterval(view: Pick<CheckStatusView, 'status'> | undefined, polls: number): number | false {
  if (view && isSettled(view.status)) return false;
  return polls < 20 ? 700 : polls < 80 ? 1500 : 4000;
}

/**
 * What to try after a failure, by what went wrong (the worker's messages: lib/vision/index.ts, lib/geometry/stages,
 * lib/checks/run-analysis.ts):
 * - the reference square not found, or its corners wrong: another photo, or mark the corners by hand in review —
 *   which needs detections to edit (`hasDetections`: a re-fit's; a photo whose first analysis failed has none);
 * - too few holes found (the square was found): the holes are looked for at the sizes the bed's pattern gives, so
 *   check the pattern, then another photo (sharp, clean, even light); marking the square's corners cannot help;
 * - holes found but too few matched the pattern: the pattern (pitch, origin), the square's corners (they set the
 *   scale the holes are matched at), or another photo;
 * - anything else (an unreadable file, a limit): another photo.
 */
export function failureAdvice(error: string | undefined, hasDetections = false): { markCorners: boolean; checkPattern: boolean; anotherPhoto: boolean } {
  const e = (error ?? '').toLowerCase();
  const holesFound = /\bonly \d+ holes? (was|were) found\b/.test(e);
  const holesMatched = /\bholes? (matched|could be matched)\b/.test(e);
  const square = !holesFound && !holesMatched && /reference square|corners/.test(e);
  return { markCorners: hasDetections && (square || holesMatched), checkPattern: holesFound || holesMatched, anotherPhoto: true };
}
