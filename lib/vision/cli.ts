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

/** Photo mode's inputs, read from the command line by lib/cli/analyze.ts. */
export interface ImageModeOptions {
  imagePath: string;
  patternPath: string;
  /** Printed side of the reference square, mm. */
  referenceMm: number;
  /** The square's corners, image px (top-left origin, y down), instead of finding them. */
  corners?: [[number, number], [number, number], [number, number], [number, number]];
  /** Where the detections are written in the points format. */
  detectionsOut?: string;
  /** The `--distances` file, if given. */
  distancesPath?: string;
}

export async function runImageMode(opts: ImageModeOptions, fail: (message: string) => never): Promise<void> {
  const { imagePath, patternPath, referenceMm, corners } = opts;
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
    const distances = readDistancesArg(opts.distancesPath, fail);
    const { report, points } = await analyzeImage(bytes, parsed.data, { referenceMm, ...(corners ? { corners } : {}), ...(distances ? { analyze: { distances } } : {}), onQuality: (q) => void (quality = q) });
    if (opts.detectionsOut) writeFileSync(opts.detectionsOut, `${JSON.stringify(points, null, 1)}\n`);
    process.stdout.write(`${JSON.stringify(report)}\n`);
  } catch (e) {
    if (e instanceof VisionInputError || e instanceof GeometryInputError) {
      // each issue's finding and advice, unless the error's reason already says it
      const advice = (quality?.issues ?? []).filter((i) => !e.message.includes(i.advice)).map((i) => `${i.message} ${i.advice}`);
      fail([e.message, ...advice].join('\n'));
    }
    throw e;
  }
}
