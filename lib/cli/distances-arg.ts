/**
 * `--distances FILE` of `npm run analyze` (points and photo mode): a JSON array of measured distances between two
 * positions, `[{ "from": "insert A1", "to": "insert R12", "mm": 1700.4, "sigmaMm": 0.3 }]` (labels as the report
 * writes them; mm and its 1σ). Parsed at the boundary; the fit names a label the pattern lacks.
 */
import { readFileSync } from 'node:fs';
import { MeasuredDistancesSchema, type MeasuredDistance } from '../geometry/contract';

/** The distances of `--distances FILE`, or undefined when the option is absent; `fail` exits with one line. */
export function readDistancesArg(args: readonly string[], fail: (message: string) => never): MeasuredDistance[] | undefined {
  const i = args.indexOf('--distances');
  if (i < 0) return undefined;
  const path = args[i + 1];
  if (path === undefined || path.startsWith('--')) fail('--distances needs a value');
  let json: unknown;
  try { json = JSON.parse(readFileSync(path, 'utf8')); } catch (e) { fail(`distances: cannot read ${path} as JSON (${(e as Error).message.split('\n')[0]})`); }
  const r = MeasuredDistancesSchema.safeParse(json);
  if (!r.success) { const q = r.error.issues[0]; fail(`distances${q?.path.length ? `.${q.path.join('.')}` : ''}: ${q?.message ?? 'invalid'}`); }
  return r.data;
}
