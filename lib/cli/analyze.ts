/**
 * CLI: `npm run -s analyze -- --points POINTS.json --pattern PATTERN.json [--corner-sigma PX] [--centre-sigma PX]
 *      [--sheet-thickness MM] [--distances DISTANCES.json]`
 * DISTANCES.json: measured distances between positions, `[{ "from": "insert A1", "to": "insert R12", "mm": 1700.4,
 * "sigmaMm": 0.3 }]`, combined with the reference square in the fit.
 * Prints the report JSON (bed frame, mm) on stdout and exits 0. Bad input exits 2 with one line on stderr that
 * names the field (bad JSON, schema violation, too few matched holes, reference corners not convex…).
 */
import { readFileSync } from 'node:fs';
import { analyzePoints, GeometryInputError, type Pattern, type Points } from '../geometry/index';
import { readDistancesArg } from './distances-arg';

function fail(message: string): never {
  process.stderr.write(`analyze: ${message}\n`);
  process.exit(2);
}

function argValue(args: string[], name: string): string | undefined {
  const i = args.indexOf(name);
  if (i < 0) return undefined;
  const v = args[i + 1];
  if (v === undefined || v.startsWith('--')) fail(`${name} needs a value`);
  return v;
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch (e) { fail(`${what}: cannot read ${path} (${(e as NodeJS.ErrnoException).code ?? 'error'})`); }
  try { return JSON.parse(text); } catch (e) { fail(`${what}: ${path} is not valid JSON (${(e as Error).message.split('\n')[0]})`); }
}

const args = process.argv.slice(2);
if (args.includes('--image')) {
  // photo mode lives in lib/vision (detection, then the same fit)
  const { runImageMode } = await import('../vision/cli');
  await runImageMode(args, fail);
  process.exit(0);
}
const pointsPath = argValue(args, '--points'), patternPath = argValue(args, '--pattern');
if (!pointsPath || !patternPath) fail('usage: analyze --points POINTS.json --pattern PATTERN.json [--corner-sigma PX] [--centre-sigma PX] [--sheet-thickness MM] [--distances DISTANCES.json]');
/** A positive number option, or undefined when absent. */
function positiveArg(name: string, unit: string): number | undefined {
  const v = argValue(args, name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x)) fail(`${name}: must be a positive number of ${unit}`);
  return x;
}
const cornerSigmaPx = positiveArg('--corner-sigma', 'px');
const centreSigmaPx = positiveArg('--centre-sigma', 'px');
const referenceThicknessMm = positiveArg('--sheet-thickness', 'mm');
const distances = readDistancesArg(args, fail);
const points = readJson(pointsPath, 'points') as Points;
const pattern = readJson(patternPath, 'pattern') as Pattern;
try {
  const report = analyzePoints(points, pattern, { cornerSigmaPx, centreSigmaPx, referenceThicknessMm, ...(distances ? { distances } : {}) });
  process.stdout.write(`${JSON.stringify(report)}\n`);
} catch (e) {
  if (e instanceof GeometryInputError) fail(e.message);
  throw e;
}
