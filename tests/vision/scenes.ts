/** Seeded rendered scenes for the vision tests: small (1.1 MP) so the suite stays fast; 12 MP lives in the bench. */
import { readFileSync } from 'node:fs';
import { PatternSchema, type Pattern } from '@/lib/geometry/contract';
import type { SceneOptions, Truth } from '@/lib/vision/render';
import type { Degradation } from '@/lib/vision/render/degrade';

export const SMALL_BED: Pattern = PatternSchema.parse(JSON.parse(readFileSync(new URL('../fixtures/vision/bed-small.json', import.meta.url), 'utf8')));

/**
 * The crop through the middle of the target (the renderer's true corners, image px) that keeps the half holding
 * the target's orientation mark or the other half, whichever side of the photo's middle the target lies on.
 */
export function cutThroughTarget(t: Truth): Degradation & { crop: NonNullable<Degradation['crop']> } {
  const xs = t.target.cornersPx.map((c) => c[0]);
  const mid = Math.round((Math.min(...xs) + Math.max(...xs)) / 2);
  const w = t.image.width;
  return mid > w / 2 ? { crop: { x: 0, y: 0, width: mid, height: t.image.height } } : { crop: { x: mid, y: 0, width: w - mid, height: t.image.height } };
}

export interface SceneCase {
  name: string;
  options: Partial<SceneOptions>;
}

const base: Partial<SceneOptions> = { width: 1200, height: 900, supersample: 3 };

/** Twelve scenes across the renderer's option ranges, then the hard ones. */
const CASES: SceneCase[] = [
  { name: 'straight down, MDF, sharp', options: { seed: 101, tiltDeg: 0, turnDeg: 0, blurPx: 0.5, jpegQuality: 95 } },
  { name: 'plywood, 4° tilt', options: { seed: 102, material: 'plywood', tiltDeg: 4, turnDeg: -6 } },
  { name: '8° tilt, barrel distortion', options: { seed: 103, tiltDeg: 8, k1: -0.06, k2: 0.02 } },
  { name: '11° tilt, pincushion distortion', options: { seed: 104, tiltDeg: 11, k1: 0.04, k2: 0 } },
  { name: 'JPEG 75, noise 4', options: { seed: 105, jpegQuality: 75, noise: 4 } },
  { name: 'defocus 1.2 px', options: { seed: 106, blurPx: 1.2, tiltDeg: 6 } },
  { name: 'strong light gradient and vignetting', options: { seed: 107, lightGradient: 0.4, vignetting: 0.4 } },
  { name: 'wide lens 24 mm, turned 20°', options: { seed: 108, focal35mm: 24, turnDeg: 20, tiltDeg: 7 } },
  { name: 'long lens 35 mm, plywood', options: { seed: 109, focal35mm: 35, material: 'plywood', tiltDeg: 3 } },
  { name: 'large injected errors', options: { seed: 110, scalePpm: 1500, squarenessDeg: 0.1, panelOffsetMm: 0.8, misplacedCount: 6, misplacedMm: 1.5 } },
  { name: 'small 120 mm target', options: { seed: 111, targetMm: 120, tiltDeg: 5 } },
  { name: 'many screws', options: { seed: 112, screwsPerM2: 40, tiltDeg: 9 } },
  { name: 'hard: low light', options: { seed: 201, exposure: 0.35, noise: 3, jpegQuality: 80 } },
  { name: 'hard: 15° tilt', options: { seed: 202, tiltDeg: 15, turnDeg: 10 } },
  { name: 'hard: heavy dust', options: { seed: 203, dustPerM2: 6000 } },
  { name: 'hard: square near the edge', options: { seed: 204, targetPlacement: 'edge', tiltDeg: 8 } },
];

export const SCENES: SceneCase[] = CASES.map((c) => ({ ...c, options: { ...base, ...c.options } }));
