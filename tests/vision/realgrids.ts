/**
 * Test helpers for ../shared/real-grids: the printed grids as patterns (pitch 20 mm, as the folder's README
 * suggests) and reference corners from four of OpenCV's dot centres forming a square of whole pitches.
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Pattern } from '@/lib/geometry/contract';

export const REAL_DIR = fileURLToPath(new URL('../../../shared/real-grids', import.meta.url));
export const PITCH = 20;

export interface RealGrid {
  name: string;
  bytes: Buffer;
  ref: [number, number][];
  pattern: Pattern;
  corners: [[number, number], [number, number], [number, number], [number, number]];
  sizeMm: number;
}

/** Dot diameter as a fraction of the pitch (of twice the pitch for the asymmetric grid), measured once on each print (for the family's size window). */
const DOT_FRACTION: Record<string, number> = { 'symmetric-7x7-large': 0.48, 'symmetric-7x7-small': 0.53, 'asymmetric-7x13': 0.34 };

export function realGridsPresent(): boolean {
  return existsSync(REAL_DIR);
}

export function loadRealGrid(name: string, dotFraction = DOT_FRACTION[name] ?? 0.45): RealGrid {
  const ref = (JSON.parse(readFileSync(path.join(REAL_DIR, `${name}.centres.json`), 'utf8')) as { centresPx: [number, number][] }).centresPx;
  const bytes = readFileSync(path.join(REAL_DIR, `${name}.png`));
  const fit = { toleranceMm: 1 };
  if (name.startsWith('asymmetric')) {
    // OpenCV's asymmetric grid: row i, column j at ((2j + i mod 2) s, i s) in OpenCV's object frame. That frame,
    // seen from the camera with image y down, is the mirror image of the bed frame seen from above (+X right, +Y
    // away): an asymmetric grid is not mirror-symmetric, so the bed's pattern is OpenCV's mirrored in X,
    // dot (i, j) at bed ((14 − 2j − i mod 2) s, (i + 1) s): rows of 7 from x = 2s (i even) and from x = s (i odd).
    const s = PITCH;
    const d = dotFraction * 2 * s;
    const pattern: Pattern = {
      version: 1, name, units: 'mm', bed: { width: 16 * s, height: 14 * s },
      families: [
        { id: 'even', kind: 'other', holeDiameter: d, origin: { x: 2 * s, y: s }, pitch: { x: 2 * s, y: 2 * s }, count: { x: 7, y: 7 }, fit },
        { id: 'odd', kind: 'other', holeDiameter: d, origin: { x: s, y: 2 * s }, pitch: { x: 2 * s, y: 2 * s }, count: { x: 7, y: 6 }, fit },
      ],
    };
    const at = (i: number, j: number) => ref[i * 7 + j]!;
    return { name, bytes, ref, pattern, corners: [at(0, 0), at(0, 2), at(4, 2), at(4, 0)], sizeMm: 4 * s };
  }
  const pattern: Pattern = {
    version: 1, name, units: 'mm', bed: { width: 8 * PITCH, height: 8 * PITCH },
    families: [{ id: 'dot', kind: 'other', holeDiameter: dotFraction * PITCH, origin: { x: PITCH, y: PITCH }, pitch: { x: PITCH, y: PITCH }, count: { x: 7, y: 7 }, fit }],
  };
  const at = (i: number, j: number) => ref[i * 7 + j]!;
  return { name, bytes, ref, pattern, corners: [at(0, 0), at(0, 2), at(2, 2), at(2, 0)], sizeMm: 2 * PITCH };
}
