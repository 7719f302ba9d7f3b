/**
 * A bed's checks as a time series for the trend chart: finished checks only, oldest photo first (by upload time, so a
 * later re-fit does not reorder them), lengths converted
 * from mm to the display unit here (at display).
 */
import type { CheckListRow } from '@/db/queries/beds';
import { fromMm, type LengthUnit } from '@/lib/report/units';

/** One check in a bed's history: the same row the checks list query returns. */
export type HistoryRow = CheckListRow;

export interface TrendPoint { id: string; t: number; rms: number | null; max: number | null; out: number | null; verdict: string | null; title: string | null }

export function trendSeries(rows: readonly HistoryRow[], unit: LengthUnit): TrendPoint[] {
  return rows
    .filter((r) => (r.status === 'done' || r.status === 'needs-review') && r.rmsMm !== null)
    .map((r) => ({ id: r.id, t: r.createdAt, rms: r.rmsMm === null ? null : fromMm(r.rmsMm, unit), max: r.maxMm === null ? null : fromMm(r.maxMm, unit), out: r.outCount, verdict: r.verdict, title: r.title }))
    .sort((a, b) => a.t - b.t);
}
