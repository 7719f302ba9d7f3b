/**
 * Export of a report's positions as CSV (RFC 4180: comma separated, CRLF line ends, fields with a comma, a
 * quote or a line break enclosed in double quotes with inner quotes doubled). Lengths are converted to the
 * chosen unit here, at the edge; the unit is named in every length column's header.
 * Bed frame: origin front-left, +X right, +Y away from the operator.
 */
import type { Report } from '@/lib/geometry/contract';
import { panelStates } from './headline';
import { hiddenWords } from './hidden';
import { csvLength, type LengthUnit } from './units';
import { formatUtcDay } from '@/lib/dates';

/** One CSV field, quoted when RFC 4180 needs it. */
export function csvField(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  const s = String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Rows → CSV text with CRLF line ends and a final CRLF. */
export function toCsv(rows: readonly (readonly (string | number | boolean | null | undefined)[])[]): string {
  return rows.map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

/**
 * The positions table of a report as CSV, lengths in `unit`. `deviation`, its uncertainty and `verdict` are against the
 * whole bed (rigid); the `hole_to_hole_*` columns are the form deviation (empty for reports made before it existed).
 */
export function positionsCsv(report: Report, unit: LengthUnit): string {
  const u = unit;
  const header = ['label', 'family', 'col', 'row', 'panel', `nominal_x_${u}`, `nominal_y_${u}`, `measured_x_${u}`, `measured_y_${u}`, `dx_${u}`, `dy_${u}`, `deviation_${u}`, `uncertainty_1sigma_${u}`, `tolerance_${u}`, 'verdict', 'under_reference',
    `hole_to_hole_dx_${u}`, `hole_to_hole_dy_${u}`, `hole_to_hole_deviation_${u}`, `hole_to_hole_uncertainty_1sigma_${u}`, 'hole_to_hole_verdict', 'not_seen_because'];
  const rows = report.positions.map((p) => [
    p.label, p.family, p.col, p.row, p.panel ?? '',
    csvLength(p.nominal.x, u), csvLength(p.nominal.y, u),
    csvLength(p.measured?.x, u), csvLength(p.measured?.y, u),
    csvLength(p.deviation?.dx, u), csvLength(p.deviation?.dy, u), csvLength(p.deviation?.r, u),
    csvLength(p.uncertaintyMm, u), csvLength(p.toleranceMm, u),
    p.verdict, p.hidden ? 'yes' : '',
    csvLength(p.form?.dx, u), csvLength(p.form?.dy, u), csvLength(p.form?.r, u), csvLength(p.form?.uncertaintyMm, u), p.form?.verdict ?? '', hiddenWords(p) ?? '',
  ]);
  return toCsv([header, ...rows]);
}

/**
 * The panels of a report as CSV, one row a panel, lengths in `unit`: its offset (dx, dy) and turn (degrees,
 * counter-clockwise seen from above) with their 1σ, the holes it was placed from, the move that puts it back (the
 * negative of the offset and turn, about its centre), its state (lib/report/headline.ts panelStates: reseat,
 * in-place, not-placed) and the core's correction in words.
 */
export function panelsCsv(report: Report, unit: LengthUnit): string {
  const u = unit;
  const states = panelStates(report);
  const deg = (v: number | undefined) => (v === undefined ? '' : v.toFixed(4));
  const header = ['panel', `dx_${u}`, `dy_${u}`, 'rotation_deg', `uncertainty_1sigma_${u}`, 'rotation_uncertainty_1sigma_deg', 'positions',
    `move_x_${u}`, `move_y_${u}`, 'turn_deg', 'verdict', 'correction'];
  const rows = report.panels.map((p) => [
    p.id, csvLength(p.dx, u), csvLength(p.dy, u), deg(p.rotationDeg), csvLength(p.uncertaintyMm, u), deg(p.rotationUncertaintyDeg), p.positions,
    csvLength(-p.dx, u), csvLength(-p.dy, u), deg(-p.rotationDeg), states.get(p.id) ?? '', p.correction,
  ]);
  return toCsv([header, ...rows]);
}

/** A file name for an export: `gridproof-<bed or check>-<yyyy-mm-dd>.<ext>`, safe on every file system. */
export function exportFileName(stem: string, date: Date, ext: 'csv' | 'json'): string {
  const safe = stem.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60) || 'check';
  return `gridproof-${safe}-${formatUtcDay(date)}.${ext}`;
}
