/**
 * `--distances FILE` of `npm run analyze` (points and photo mode): a JSON array of measured distances between two
 * positions, `[{ "from": "insert A1", "to": "insert R12", "mm": 1700.4, "sigmaMm": 0.3 }]` (labels as the report
 * writes them; mm and its 1σ). Parsed at the boundary; the fit names a label the pattern lacks.
 */
import { readFileSync } from 'node:fs';
import { MeasuredDistancesSchema, type MeasuredDistance } from '../geometry/contract';

/** The distances in the file `path` of `--distances`, or undefined when the option is absent; `fail` exits with one line. */
export function readDistancesArg(path: string | undefined, fail: (message: string) => never): MeasuredDistance[] | undefined {
  if (path === undefined) return undefined;
  let json: unknown;
  try { json = JSON.parse(readFileSync(path, 'utf8')); } catch (e) { fail(`distances: cannot read ${path} as JSON (${(e as Error).message.split('\n')[0]})`); }
  const r = MeasuredDistancesSchema.safeParse(json);
  if (!r.success) { const q = r.error.issues[0]; fail(`distances${q?.path.length ? `.${q.path.join('.')}` : ''}: ${q?.message ?? 'invalid'}`); }
  return r.data;
}
