/**
 * The items of a report's deviation map in one view (lib/report/words.ts MapView), for every surface that draws
 * it as a list of marks (web report, shared page): each position at its nominal place (bed frame, mm, origin
 * front-left, +X right, +Y away), its displacement (mm) on the whole bed or hole to hole, its mark in that view and
 * a sentence for hover or tap, lengths in the reader's unit.
 */
import type { Report } from '@/lib/geometry/contract';
import { formatLength, type LengthUnit } from './units';
import { MARK_WORD, outOfSightWords, viewDeviation, viewMark, type Mark, type MapView } from './words';

/** One mark of a deviation map (web report, shared page, comparison). */
export interface MapItem {
  key: string;
  label: string;
  /** Nominal place, bed mm. */
  x: number;
  y: number;
  /** Displacement in the view, mm (null when not measured). */
  dx: number | null;
  dy: number | null;
  mark: Mark;
  /** Text for hover/tap. */
  title: string;
  /** Drawn bolder (e.g. a change larger than its uncertainty). */
  emphasis?: boolean;
}

/** One item per position of `report`, as `view` shows it, titles in `unit`. */
export function reportMapItems(report: Pick<Report, 'positions'>, view: MapView, unit: LengthUnit): MapItem[] {
  const len = (mm: number, signed = false) => formatLength(mm, unit, { signed });
  return report.positions.map((p) => {
    const d = viewDeviation(p, view);
    const mark = viewMark(p, view);
    const why = outOfSightWords(p);
    return {
      key: p.label, label: p.label, x: p.nominal.x, y: p.nominal.y, dx: d?.dx ?? null, dy: d?.dy ?? null, mark,
      title: d
        ? `${p.label}: ${len(d.r)} off${view === 'form' && p.form ? ' hole to hole' : ''} (X ${len(d.dx, true)}, Y ${len(d.dy, true)}), allowed ${len(p.toleranceMm)} — ${MARK_WORD[mark]}`
        : `${p.label}: ${MARK_WORD[mark].toLowerCase()}${why ? ` (${why})` : ''}`,
    };
  });
}
