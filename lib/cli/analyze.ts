/**
 * CLI: `npm run -s analyze -- --points POINTS.json --pattern PATTERN.json [--corner-sigma PX] [--centre-sigma PX]
 *      [--sheet-thickness MM] [--distances DISTANCES.json]`, or photo mode with `--image` (lib/vision/cli.ts).
 * DISTANCES.json: measured distances between positions, `[{ "from": "insert A1", "to": "insert R12", "mm": 1700.4,
 * "sigmaMm": 0.3 }]`, combined with the reference square in the fit.
 * Prints the report JSON (bed frame, mm) on stdout and exits 0. Bad input exits 2 with one line on stderr that
 * names the field (bad JSON, schema violation, too few matched holes, reference corners not convex…); so does an
 * unknown option. `--help` prints the usage.
 */
import { readFileSync } from 'node:fs';
import { analyzePoints, GeometryInputError, type Pattern, type Points } from '../geometry/index';
import { exitWithUsageError, numberOption, parseCliArgs, type CliUsage } from './args';
import { readDistancesArg } from './distances-arg';

const cli: CliUsage = {
  name: 'analyze',
  usage: `
Fits a bed's measured hole centres to its pattern and prints the report JSON (bed frame, mm).

  analyze --points POINTS.json --pattern PATTERN.json [--corner-sigma PX] [--centre-sigma PX]
          [--sheet-thickness MM] [--distances DISTANCES.json]
  analyze --image PHOTO --pattern PATTERN.json --reference-mm MM [--corners x1,y1,…,x4,y4]
          [--detections-out D.json] [--distances DISTANCES.json]

  --points FILE          hole centres and reference corners found in a photo (image px)
  --image FILE           a top-down photo of the bed with the printed reference square
  --pattern FILE         the bed's nominal pattern (bed mm)
  --reference-mm MM      printed side of the reference square (photo mode)
  --corners LIST         the square's corners in the photo, eight numbers (image px), instead of finding them
  --detections-out FILE  writes the photo's detections in the points format (re-fit them with --points)
  --corner-sigma PX      1σ of the reference corners (points mode)
  --centre-sigma PX      1σ of the hole centres (points mode)
  --sheet-thickness MM   thickness of the sheet the square is printed on (points mode)
  --distances FILE       measured distances between positions, combined with the square in the fit
  -h, --help             this text

Exit 0 with the report on stdout; exit 2 with one line on stderr for bad input or usage.`,
};
function fail(message: string): never { return exitWithUsageError(cli.name, message); }

const opts = parseCliArgs(cli, {
  points: { type: 'string' },
  image: { type: 'string' },
  pattern: { type: 'string' },
  'reference-mm': { type: 'string' },
  corners: { type: 'string' },
  'detections-out': { type: 'string' },
  'corner-sigma': { type: 'string' },
  'centre-sigma': { type: 'string' },
  'sheet-thickness': { type: 'string' },
  distances: { type: 'string' },
});

function readJson(path: string, what: string): unknown {
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch (e) { fail(`${what}: cannot read ${path} (${(e as NodeJS.ErrnoException).code ?? 'error'})`); }
  try { return JSON.parse(text); } catch (e) { fail(`${what}: ${path} is not valid JSON (${(e as Error).message.split('\n')[0]})`); }
}

/** Options given that belong to the other mode, as `--name`. */
const given = (names: readonly (keyof typeof opts)[]) => names.filter((n) => opts[n] !== undefined).map((n) => `--${n}`);

if (opts.image !== undefined) {
  const wrong = given(['points', 'corner-sigma', 'centre-sigma', 'sheet-thickness']);
  if (wrong.length) fail(`${wrong.join(', ')}: not taken with --image (see --help)`);
  if (!opts.pattern || opts['reference-mm'] === undefined) fail('photo mode needs --image, --pattern and --reference-mm (see --help)');
  let corners: [[number, number], [number, number], [number, number], [number, number]] | undefined;
  if (opts.corners !== undefined) {
    const v = opts.corners.split(',').map(Number);
    if (v.length !== 8 || v.some((x) => !Number.isFinite(x))) fail('--corners: give eight numbers x1,y1,…,x4,y4 (image px)');
    corners = [[v[0]!, v[1]!], [v[2]!, v[3]!], [v[4]!, v[5]!], [v[6]!, v[7]!]];
  }
  // photo mode lives in lib/vision (detection, then the same fit)
  const { runImageMode } = await import('../vision/cli');
  await runImageMode({
    imagePath: opts.image,
    patternPath: opts.pattern,
    referenceMm: numberOption(cli, 'reference-mm', opts['reference-mm'], { positive: true, unit: 'mm' })!,
    ...(corners ? { corners } : {}),
    ...(opts['detections-out'] ? { detectionsOut: opts['detections-out'] } : {}),
    distancesPath: opts.distances,
  }, fail);
  process.exit(0);
}
const wrong = given(['reference-mm', 'corners', 'detections-out']);
if (wrong.length) fail(`${wrong.join(', ')}: taken with --image only (see --help)`);
if (!opts.points || !opts.pattern) fail('needs --points and --pattern, or --image (see --help)');
const cornerSigmaPx = numberOption(cli, 'corner-sigma', opts['corner-sigma'], { positive: true, unit: 'px' });
const centreSigmaPx = numberOption(cli, 'centre-sigma', opts['centre-sigma'], { positive: true, unit: 'px' });
const referenceThicknessMm = numberOption(cli, 'sheet-thickness', opts['sheet-thickness'], { positive: true, unit: 'mm' });
const distances = readDistancesArg(opts.distances, fail);
const points = readJson(opts.points, 'points') as Points;
const pattern = readJson(opts.pattern, 'pattern') as Pattern;
try {
  const report = analyzePoints(points, pattern, { cornerSigmaPx, centreSigmaPx, referenceThicknessMm, ...(distances ? { distances } : {}) });
  process.stdout.write(`${JSON.stringify(report)}\n`);
} catch (e) {
  if (e instanceof GeometryInputError) fail(e.message);
  throw e;
}
