/**
 * The upload form's measured distances between two positions: rows typed as text (labels as the report writes
 * them, a length and its ±1σ in mm or inches), checked with zod and sent in mm as the API's `distances` JSON.
 * Pure; the field group (./DistancesFields.tsx) and the tests share it.
 */
import { z } from 'zod';
import { MM_PER_IN, MeasuredDistancesSchema, type MeasuredDistance } from '@/lib/geometry/contract';

export interface DistanceRow { from: string; to: string; length: string; sigma: string }
export const EMPTY_DISTANCE_ROW: DistanceRow = { from: '', to: '', length: '', sigma: '' };

const number = (what: string) => z.coerce.number({ error: `Give the ${what} as a number.` }).finite(`Give the ${what} as a number.`).positive(`The ${what} must be more than 0.`);
const RowSchema = z.object({
  from: z.string().trim().min(1, 'Give the first position, e.g. "insert A1".').max(60),
  to: z.string().trim().min(1, 'Give the second position, e.g. "insert R12".').max(60),
  length: number('distance'),
  sigma: number('uncertainty'),
});

const blank = (r: DistanceRow) => !r.from.trim() && !r.to.trim() && !r.length.trim() && !r.sigma.trim();

/**
 * The rows as the API's distances (mm), or the first problem in words with the row's number. Blank rows are left
 * out; `units` is the unit the lengths and uncertainties were typed in.
 */
export function parseDistanceRows(rows: readonly DistanceRow[], units: 'mm' | 'in'): { ok: true; distances: MeasuredDistance[] } | { ok: false; message: string } {
  const k = units === 'in' ? MM_PER_IN : 1;
  const out: MeasuredDistance[] = [];
  for (const [i, row] of rows.entries()) {
    if (blank(row)) continue;
    const r = RowSchema.safeParse(row);
    if (!r.success) return { ok: false, message: `Distance ${i + 1}: ${r.error.issues[0]!.message}` };
    if (r.data.from.toLowerCase() === r.data.to.toLowerCase()) return { ok: false, message: `Distance ${i + 1}: the two ends are the same position.` };
    out.push({ from: r.data.from, to: r.data.to, mm: r.data.length * k, sigmaMm: r.data.sigma * k });
  }
  const checked = MeasuredDistancesSchema.safeParse(out);
  if (!checked.success) return { ok: false, message: `Distances: ${checked.error.issues[0]!.message}` };
  return { ok: true, distances: checked.data };
}
