/**
 * Renders a realistic bed photo with exactly known truth.
 *
 *   npm run -s synth -- --pattern P.json --seed N --out DIR [--width 1600 --height 1200 --tilt 5 --turn 3
 *     --material mdf|plywood --focal35 27 --k1 -0.03 --k2 0.01 --blur 0.7 --noise 2 --jpeg 90 --exposure 1
 *     --gradient 0.15 --vignetting 0.2 --dust 400 --screws 6 --target-mm 150 --target-edge --scale-ppm 400
 *     --squareness 0.03 --panel-offset 0.3 --misplaced 3 --misplaced-mm 0.8 --supersample 4
 *     --camera linear|phone|encoded --contrast 0.5 --sharpen-px 1.5 --sharpen-amount 0.8]
 *
 * Writes DIR/photo.jpg and DIR/truth.json (bed mm, image px; see lib/vision/render/scene.ts for the frames
 * and the order in which the injected errors apply).
 */
import { mkdir, readFile, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { PatternSchema } from '@/lib/geometry/contract';
import { synthesize } from '@/lib/vision/render';
import { DEFAULT_SCENE, type SceneOptions } from '@/lib/vision/render/scene';

const FLAGS: Record<string, keyof SceneOptions> = {
  '--width': 'width', '--height': 'height', '--seed': 'seed', '--tilt': 'tiltDeg', '--turn': 'turnDeg', '--focal35': 'focal35mm',
  '--k1': 'k1', '--k2': 'k2', '--blur': 'blurPx', '--noise': 'noise', '--jpeg': 'jpegQuality', '--exposure': 'exposure',
  '--gradient': 'lightGradient', '--vignetting': 'vignetting', '--dust': 'dustPerM2', '--screws': 'screwsPerM2',
  '--target-mm': 'targetMm', '--scale-ppm': 'scalePpm', '--squareness': 'squarenessDeg', '--panel-offset': 'panelOffsetMm',
  '--misplaced': 'misplacedCount', '--misplaced-mm': 'misplacedMm', '--supersample': 'supersample',
  '--contrast': 'contrast', '--sharpen-px': 'sharpenPx', '--sharpen-amount': 'sharpenAmount',
};

function fail(msg: string): never {
  process.stderr.write(`synth: ${msg}\n`);
  process.exit(2);
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const opts: SceneOptions = { ...DEFAULT_SCENE };
  let patternPath: string | undefined;
  let out: string | undefined;
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    const next = () => args[++i] ?? fail(`${a} needs a value`);
    if (a === '--pattern') patternPath = next();
    else if (a === '--out') out = next();
    else if (a === '--material') {
      const m = next();
      if (m !== 'mdf' && m !== 'plywood') fail('--material is mdf or plywood');
      opts.material = m;
    } else if (a === '--camera') {
      const c = next();
      if (c !== 'linear' && c !== 'phone' && c !== 'encoded') fail('--camera is linear, phone or encoded');
      opts.camera = c;
    } else if (a === '--target-edge') opts.targetPlacement = 'edge';
    else if (FLAGS[a]) {
      const v = Number(next());
      if (!Number.isFinite(v)) fail(`${a} needs a number`);
      (opts as unknown as Record<string, number>)[FLAGS[a]] = v;
    } else fail(`unknown option ${a}`);
  }
  if (!patternPath || !out) fail('usage: synth --pattern P.json --seed N --out DIR [options]');
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
