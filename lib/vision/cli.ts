/**
 * Photo mode of `npm run analyze`:
 *   analyze --image PHOTO --pattern P.json --reference-mm 150 [--corners x1,y1,…,x4,y4] [--detections-out D.json]
 *           [--distances DISTANCES.json]
 * Prints the report JSON (with the photo-quality verdict as `photo.quality`); D.json receives the detections in the
 * points format (re-fit them with --points). Unreadable photos, no square (and no corners), too few holes: exit 2
 * with the reason, then each photo-quality issue's finding and advice, one line each.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { GeometryInputError, PatternSchema } from '@/lib/geometry';
import type { PhotoQuality } from '@/lib/geometry/contract';
import { analyzeImage, VisionInputError } from './index';
import { readDistancesArg } from '../cli/distances-arg';

export async function runImageMode(args: string[], fail: (message: string) => never): Promise<void> {
  const val = (name: string): string | undefined => {
    const i = args.indexOf(name);
    if (i < 0) return undefined;
    const v = args[i + 1];
    if (v === undefined || v.startsWith('--')) fail(`${name} needs a value`);
    return v;
  };
  const imagePath = val('--image');
  const patternPath = val('--pattern');
  const refArg = val('--reference-mm');
  if (!imagePath || !patternPath || !refArg) fail('usage: analyze --image PHOTO --pattern P.json --reference-mm MM [--corners x1,y1,…,x4,y4] [--detections-out D.json] [--distances DISTANCES.json]');
  const referenceMm = Number(refArg);
  if (!(referenceMm > 0)) fail('--reference-mm: must be a positive number of mm');
  let corners: [[number, number], [number, number], [number, number], [number, number]] | undefined;
  const c = val('--corners');
  if (c !== undefined) {
    const v = c.split(',').map(Number);
    if (v.length !== 8 || v.some((x) => !Number.isFinite(x))) fail('--corners: give eight numbers x1,y1,…,x4,y4 (image px)');
    corners = [[v[0]!, v[1]!], [v[2]!, v[3]!], [v[4]!, v[5]!], [v[6]!, v[7]!]];
  }
  let bytes: Buffer;
  try {
    bytes = readFileSync(imagePath);
  } catch (e) {
    fail(`image: cannot read ${imagePath} (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  let patternJson: unknown;
  try {
    patternJson = JSON.parse(readFileSync(patternPath, 'utf8'));
  } catch (e) {
    fail(`pattern: cannot read ${patternPath} as JSON (${(e as Error).message.split('\n')[0]})`);
  }
  const parsed = PatternSchema.safeParse(patternJson);
  if (!parsed.success) fail(`pattern.${parsed.error.issues[0]?.path.join('.') ?? ''}: ${parsed.error.issues[0]?.message ?? 'invalid'}`);
  let quality: PhotoQuality | undefined;
  try {
    const distances = readDistancesArg(args, fail);
    const { report, points } = await analyzeImage(bytes, parsed.data, { referenceMm, ...(corners ? { corners } : {}), ...(distances ? { analyze: { distances } } : {}), onQuality: (q) => void (quality = q) });
    const out = val('--detections-out');
    if (out) writeFileSync(out, `${JSON.stringify(points, null, 1)}\n`);
    process.stdout.write(`${JSON.stringify(report)}\n`);
  } catch (e) {
    if (e instanceof VisionInputError || e instanceof GeometryInputError) {
      const advice = (quality?.issues ?? []).map((i) => `${i.message} ${i.advice}`);
      fail([e.message, ...advice].join('\n'));
    }
    throw e;
  }
}
