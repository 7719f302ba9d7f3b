/**
 * The words every surface of a report shows (web report, shared page, PDF, mail, comparison): the bed's verdict
 * in one word, the name of each mark, the figures' headings, and the counts behind them. One definition of each
 * count, so a headline and a card never disagree:
 * - measured: a hole was found at the position;
 * - not seen: the position lies where the photo could show it, yet no hole was found there;
 * - hidden: the position could not be seen, or only in part (under the reference sheet or at its edge, covered,
 *   cut by the photo's edge, or outside the photo): not measured, neither in nor out;
 * - unmatched: a hole was found that fits no position of the pattern.
 */
import type { Report, ReportPosition } from '@/lib/geometry/contract';
import { hiddenWords } from './hidden';

export type BedVerdict = Report['summary']['verdict'];

/** The bed's verdict in one word. */
export const BED_VERDICT_WORD: Record<BedVerdict, string> = { pass: 'Pass', marginal: 'Marginal', fail: 'Fail' };

/** What a mark stands for: a position's verdict, a position out of view, or a detection that fits no position. */
export type Mark = 'in' | 'marginal' | 'out' | 'missing' | 'hidden' | 'unmatched';

/** The name of each mark (legends, tables, the PDF and the mail alike). */
export const MARK_WORD: Record<Mark, string> = {
  in: 'In',
  marginal: 'Marginal',
  out: 'Out',
  missing: 'Not seen',
  hidden: 'Hidden',
  unmatched: 'Unmatched',
};

/** What each mark means, in a machinist's words. */
export const MARK_MEANING: Record<Mark, string> = {
  in: 'within the fit tolerance, with room to spare',
  marginal: 'too close to the tolerance to call either way',
  out: 'beyond the fit tolerance: what goes in may bind',
  missing: 'expected in the photo but no hole was found there',
  hidden: 'under the reference sheet, covered, cut by the edge of the photo or outside it: not measured, neither in nor out',
  unmatched: 'a detected hole that fits no position of the pattern',
};

/** The mark a bed verdict is drawn with: a pass as the mark of a position in, a fail as the mark of one out. */
export const BED_VERDICT_MARK: Record<BedVerdict, Mark> = { pass: 'in', marginal: 'marginal', fail: 'out' };

/** True when a position was not found because it could not be seen, or only in part (hidden or outside the photo). */
export const outOfSight = (p: Pick<ReportPosition, 'verdict' | 'hidden' | 'outOfView'>): boolean => p.verdict === 'missing' && (!!p.hidden || !!p.outOfView);

/** The mark of a position: its verdict, or `hidden` when it could not be seen. */
export function positionMark(p: Pick<ReportPosition, 'verdict' | 'hidden' | 'outOfView'>): Mark {
  return outOfSight(p) ? 'hidden' : p.verdict;
}

/** Why a hidden position could not be seen, in words (lib/report/hidden.ts, or outside the photo); null otherwise. */
export function outOfSightWords(p: Pick<ReportPosition, 'verdict' | 'hidden' | 'hiddenBy' | 'outOfView'>): string | null {
  if (!outOfSight(p)) return null;
  return hiddenWords(p) ?? 'outside the photo';
}

export interface ReportCounts {
  /** Positions of the pattern. */
  positions: number;
  /** Positions the photo could show (all but those out of sight). */
  inView: number;
  measured: number;
  in: number;
  marginal: number;
  out: number;
  /** Expected in the photo, not found. */
  missing: number;
  /** Hidden: under the reference sheet, covered, cut by the photo's edge or outside the photo. */
  hidden: number;
  unmatched: number;
}

/** The counts of a report, each by the definition in this module's header. */
export function reportCounts(report: Pick<Report, 'positions' | 'unmatched'>): ReportCounts {
  const c: ReportCounts = { positions: report.positions.length, inView: 0, measured: 0, in: 0, marginal: 0, out: 0, missing: 0, hidden: 0, unmatched: report.unmatched.length };
  for (const p of report.positions) {
    const m = positionMark(p);
    if (m === 'unmatched') continue;
    c[m] += 1;
    if (p.deviation) c.measured += 1;
  }
  c.inView = c.positions - c.hidden;
  return c;
}

/** The figures a report opens with, heading and value, in this order on every surface. */
export function figureCards(c: ReportCounts, rms: string, largest: string): [string, string][] {
  return [
    ['Measured', String(c.measured)],
    [MARK_WORD.out, String(c.out)],
    [MARK_WORD.marginal, String(c.marginal)],
    [MARK_WORD.missing, String(c.missing)],
    [MARK_WORD.hidden, String(c.hidden)],
    ['RMS off', rms],
    ['Largest', largest],
  ];
}

/**
 * The words naming the bed's edges on every drawing of the bed (the report's map on the web, the shared page and
 * the comparison, the PDF's maps, the mail's map image, the accessory fit and the pattern drawing): the bed seen
 * from above, its front (the operator's side, Y = 0) at the bottom and its back at the top. `orientation` says
 * the same in a sentence's words, for a map's label.
 */
export const MAP_EDGE_WORDS = {
  front: 'front of bed (you stand here)',
  back: 'back of bed',
  orientation: 'front of the bed at the bottom',
} as const;

/** The arrow exaggeration as every legend prints it. */
export const arrowScaleWords = (factor: number): string => `arrows × ${factor.toLocaleString('en')}`;

/**
 * Which deviation a map draws: each position's on the whole bed (after the best rigid placement of the whole
 * lattice: the position's `deviation` and `verdict`), or hole to hole (its `form`: after the best affine placement,
 * which takes the lattice's own size and squareness out — what a fixture spanning part of the bed feels).
 */
export type MapView = 'bed' | 'form';
export const MAP_VIEWS: MapView[] = ['bed', 'form'];

/** The name of each view: the same words as the tables' columns (web, PDF). */
export const MAP_VIEW_WORD: Record<MapView, string> = { bed: 'Whole bed', form: 'Hole to hole' };

/** What each view shows, in a machinist's words. */
export const MAP_VIEW_MEANING: Record<MapView, string> = {
  bed: 'each position against where the pattern puts it, the lattice placed as a whole: what a fixture spanning the bed feels',
  form: "each position against its neighbours, the lattice's own size and squareness taken out: what a fixture spanning part of the bed feels",
};

/** True when the report carries hole-to-hole deviations (reports made before them do not). */
export const hasFormView = (report: Pick<Report, 'positions'>): boolean => report.positions.some((p) => !!p.form);

/** A position's mark in a view: hole to hole its form verdict when it has one, else as on the whole bed. */
export function viewMark(p: Pick<ReportPosition, 'verdict' | 'hidden' | 'outOfView' | 'form'>, view: MapView): Mark {
  return view === 'form' && p.form ? p.form.verdict : positionMark(p);
}

/** A position's deviation in a view (bed frame, mm): hole to hole its form deviation, else its rigid one; null when not measured. */
export function viewDeviation(p: Pick<ReportPosition, 'deviation' | 'form'>, view: MapView): { dx: number; dy: number; r: number } | null {
  if (view === 'form' && p.form) return { dx: p.form.dx, dy: p.form.dy, r: p.form.r };
  return p.deviation;
}

/** The counts of a report's marks in a view (measured, not seen, hidden and unmatched are the same in both). */
export function viewCounts(report: Pick<Report, 'positions' | 'unmatched'>, view: MapView): ReportCounts {
  const c = reportCounts(report);
  if (view === 'bed') return c;
  const out = { ...c, in: 0, marginal: 0, out: 0 };
  for (const p of report.positions) {
    const m = viewMark(p, view);
    if (m === 'in' || m === 'marginal' || m === 'out') out[m] += 1;
  }
  return out;
}
