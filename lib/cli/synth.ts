/**
 * Renders a realistic bed photo with exactly known truth.
 *
 *   npm run -s synth -- --pattern P.json --seed N --out DIR [--width 1600 --height 1200 --tilt 5 --turn 3
 *     --material mdf|plywood --focal35 27 --k1 -0.03 --k2 0.01 --blur 0.7 --noise 2 --jpeg 90 --exposure 1
 *     --gradient 0.15 --vignetting 0.2 --dust 400 --screws 6 --target-mm 150 --target-edge --target-plain --scale-ppm 400
 *     --squareness 0.03 --panel-offset 0.3 --misplaced 3 --misplaced-mm 0.8 --supersample 4
 *     --camera linear|phone|encoded --contrast 0.5 --sharpen-px 1.5 --sharpen-amount 0.8]
 *
 * Writes DIR/photo.jpg and DIR/truth.json (bed mm, image px; see lib/vision/render/scene.ts for the frames
 * and the order in which the injected errors apply). `--help` prints the options; an unknown one exits 2.
 */
import { mkdir, readFile, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { PatternSchema } from '@/lib/geometry/contract';
import { synthesize } from '@/lib/vision/render';
import { DEFAULT_SCENE, type SceneOptions } from '@/lib/vision/render/scene';
import { exitWithUsageError, numberOption, parseCliArgs, type CliUsage } from './args';

/** The numeric options and the scene field each sets. */
const NUMBERS: Record<string, keyof SceneOptions> = {
  width: 'width', height: 'height', seed: 'seed', tilt: 'tiltDeg', turn: 'turnDeg', focal35: 'focal35mm',
  k1: 'k1', k2: 'k2', blur: 'blurPx', noise: 'noise', jpeg: 'jpegQuality', exposure: 'exposure',
  gradient: 'lightGradient', vignetting: 'vignetting', dust: 'dustPerM2', screws: 'screwsPerM2',
  'target-mm': 'targetMm', 'scale-ppm': 'scalePpm', squareness: 'squarenessDeg', 'panel-offset': 'panelOffsetMm',
  misplaced: 'misplacedCount', 'misplaced-mm': 'misplacedMm', supersample: 'supersample',
  contrast: 'contrast', 'sharpen-px': 'sharpenPx', 'sharpen-amount': 'sharpenAmount',
};

const cli: CliUsage = {
  name: 'synth',
  usage: `
Renders a bed photo with exactly known truth: writes DIR/photo.jpg and DIR/truth.json, prints a JSON summary.

  npm run -s synth -- --pattern P.json --seed N --out DIR [options]

  --pattern FILE   the bed's nominal pattern (bed mm)
  --out DIR        where photo.jpg and truth.json go
  --material mdf|plywood      --camera linear|phone|encoded      --target-edge (square at the bed's edge)
  --target-plain   a plain filled square (older printed targets, outer edges only) instead of the framed target
  numbers (defaults in lib/vision/render/scene.ts): ${Object.keys(NUMBERS).map((k) => `--${k}`).join(' ')}
  -h, --help       this text

A negative number may follow its option directly (--k1 -0.03).`,
};

function fail(msg: string): never {
  return exitWithUsageError(cli.name, msg);
}

async function main(): Promise<void> {
  const args = parseCliArgs(cli, {
    pattern: { type: 'string' },
    out: { type: 'string' },
    material: { type: 'string' },
    camera: { type: 'string' },
    'target-edge': { type: 'boolean' },
    'target-plain': { type: 'boolean' },
    ...Object.fromEntries(Object.keys(NUMBERS).map((k) => [k, { type: 'string' as const }])),
  });
  const opts: SceneOptions = { ...DEFAULT_SCENE };
  const { pattern: patternPath, out, material, camera } = args;
  if (material !== undefined) {
    if (material !== 'mdf' && material !== 'plywood') fail('--material is mdf or plywood');
    opts.material = material;
  }
  if (camera !== undefined) {
    if (camera !== 'linear' && camera !== 'phone' && camera !== 'encoded') fail('--camera is linear, phone or encoded');
    opts.camera = camera;
  }
  if (args['target-edge']) opts.targetPlacement = 'edge';
  if (args['target-plain']) opts.targetStyle = 'plain';
  for (const [flag, field] of Object.entries(NUMBERS)) {
    const v = numberOption(cli, flag, (args as Record<string, string | boolean | undefined>)[flag] as string | undefined);
    if (v !== undefined) (opts as unknown as Record<string, number>)[field] = v;
  }
  if (!patternPath || !out) fail('needs --pattern and --out (see --help)');
  if (opts.tiltDeg < 0 || opts.tiltDeg > 25) fail('--tilt is 0–25 degrees');
  if (opts.jpegQuality < 1 || opts.jpegQuality > 100) fail('--jpeg is 1–100');
  const parsed = PatternSchema.safeParse(JSON.parse(await readFile(patternPath, 'utf8')));
  if (!parsed.success) fail(`the pattern is not valid: ${parsed.error.issues[0]?.message ?? ''}`);
  const { jpeg, truth } = await synthesize(parsed.data, opts);
  await mkdir(out, { recursive: true });
  await writeFile(path.join(out, 'photo.jpg'), jpeg);
  await writeFile(path.join(out, 'truth.json'), JSON.stringify(truth, null, 1));
  const visible = truth.holes.filter((h) => h.visible).length;
  process.stdout.write(`${JSON.stringify({ photo: path.join(out, 'photo.jpg'), truth: path.join(out, 'truth.json'), holes: truth.holes.length, visible, mmPerPx: truth.mmPerPx })}\n`);
}

await main();
