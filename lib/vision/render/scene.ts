/**
 * Scene model of a rendered bed photo: where every hole truly is (nominal + injected errors), the paper target,
 * screws, dust, the camera, and the shading of a bed point. Bed frame: mm, origin front-left, +X right, +Y away;
 * image: px, origin top-left, +y down.
 *
 * buildScene is a pipeline of the stages beside it: scene-errors (the injected lattice, panel and misplacement
 * errors and the order they apply in), scene-camera (where the camera stands), scene-target (the square and its
 * sheet), scene-cover (sheet, objects, channels by bed point), scene-holes (true positions, projection, what hides
 * them), scene-discs (holes, screws and dust as painted discs), scene-shading (the reflectance of a bed point).
 */
import type { Pattern } from '@/lib/geometry/contract';
import type { Camera } from './camera';
import { gauss, makeRng, type Rng } from './rng';
import { placeCamera } from './scene-camera';
import { bedCover } from './scene-cover';
import { DiscGrid, scatterScrewsAndDust } from './scene-discs';
import { drawLatticeErrors } from './scene-errors';
import { placeHoles } from './scene-holes';
import { makeShader } from './scene-shading';
import { placeTarget } from './scene-target';

export interface SceneOptions {
  /** Image size, px. */
  width: number;
  height: number;
  seed: number;
  material: 'mdf' | 'plywood';
  /** Camera tilt away from straight down, degrees (0–25), and turn about the optical axis, degrees. */
  tiltDeg: number;
  turnDeg: number;
  /** 35 mm-equivalent focal length, mm. */
  focal35mm: number;
  /** Radial distortion k1, k2. */
  k1: number;
  k2: number;
  /** Defocus blur, Gaussian sigma in px (0–1.5). */
  blurPx: number;
  /** Camera pipeline from linear light to encoded values (render.ts): 'linear', 'phone' or 'encoded'. */
  camera: 'linear' | 'phone' | 'encoded';
  /** Phone pipeline: mid-tone contrast strength (0–1, render.ts midToneCurve), unsharp-mask sigma (px) and amount. */
  contrast: number;
  sharpenPx: number;
  sharpenAmount: number;
  /** Sensor noise sigma at mid grey, in 8-bit units. */
  noise: number;
  jpegQuality: number;
  /** Overall exposure (1 = normal, 0.35 = low light); light gradient amplitude; vignetting at the corners. */
  exposure: number;
  lightGradient: number;
  vignetting: number;
  /** Dust specks and chips per square metre. */
  dustPerM2: number;
  /** Screws per square metre (countersunk heads, off the lattice). */
  screwsPerM2: number;
  targetMm: number;
  /** Printed target: Gridproof's framed target (target.ts) or an older plain filled square with outer edges only. */
  targetStyle: 'frame' | 'plain';
  /** Target placement: random inside the bed, or next to an edge of the photo. */
  targetPlacement: 'random' | 'edge';
  /** Injected errors. */
  scalePpm: number;
  squarenessDeg: number;
  panelOffsetMm: number;
  misplacedCount: number;
  misplacedMm: number;
  /** Supersampling factor per axis for pixels on an edge. */
  supersample: number;
  /** The sheet the target is printed on, width × height mm (default: A4, or the square and its margin if larger). */
  sheetMm?: [number, number];
  /** Where the square's centre lies on the bed, mm, and its turn, degrees (default: drawn from the seed). */
  targetCentreMm?: [number, number];
  targetRotationDeg?: number;
  /** Objects lying on the bed (clamp bars, a scrap of board), bed mm rectangles, linear reflectance (default 0.06, black): they hide what lies under them. */
  occluders?: { x: number; y: number; width: number; height: number; tone?: number }[];
}

export const DEFAULT_SCENE: SceneOptions = {
  width: 1600,
  height: 1200,
  seed: 1,
  material: 'mdf',
  tiltDeg: 5,
  turnDeg: 3,
  focal35mm: 27,
  k1: -0.03,
  k2: 0.01,
  blurPx: 0.7,
  camera: 'linear',
  contrast: 0.5,
  sharpenPx: 1.5,
  sharpenAmount: 0.8,
  noise: 2,
  jpegQuality: 90,
  exposure: 1,
  lightGradient: 0.15,
  vignetting: 0.2,
  dustPerM2: 400,
  screwsPerM2: 6,
  targetMm: 150,
  targetStyle: 'frame',
  targetPlacement: 'random',
  scalePpm: 400,
  squarenessDeg: 0.03,
  panelOffsetMm: 0.3,
  misplacedCount: 3,
  misplacedMm: 0.8,
  supersample: 4,
};

export interface TruthHole {
  family: string;
  kind: string;
  col: number;
  row: number;
  nominal: { x: number; y: number };
  /** True bed position, mm. */
  bed: { x: number; y: number };
  /** True image position, px (through the camera and its distortion). */
  px: [number, number];
  diameterMm: number;
  visible: boolean;
  hiddenBy?: 'target' | 'channel' | 'outside' | 'occluder';
}

export interface Scene {
  options: SceneOptions;
  pattern: Pattern;
  camera: Camera;
  holes: TruthHole[];
  /** The square (`sizeMm`, its centre and turn on the bed, corners) and the sheet it is printed on (`sheetMm`, centred on it). */
  target: { sizeMm: number; centreMm: [number, number]; rotationRad: number; cornersBed: [number, number][]; cornersPx: [number, number][]; sheetMm: [number, number] };
  errors: {
    scaleX: number;
    scaleY: number;
    squarenessDeg: number;
    panels: { id: string; dx: number; dy: number; rotationDeg: number }[];
    misplaced: { family: string; col: number; row: number; dx: number; dy: number }[];
  };
  /** Approximate scale at the image centre, mm per px. */
  mmPerPx: number;
  /** Paints a bed point: writes linear RGB reflectance into out. */
  shade: (X: number, Y: number, out: Float64Array) => void;
}

/**
 * Builds the scene for a pattern and options (deterministic for the seed). One random stream, drawn in this order
 * (which fixes every seeded scene): the injected errors, the camera's tilt direction, the target's place, each
 * hole's look, the screws and dust, the light's direction.
 */
export function buildScene(pattern: Pattern, opts: SceneOptions): Scene {
  const rng = makeRng(opts.seed * 7919 + 17);
  const errors = drawLatticeErrors(rng, pattern, opts);
  const { camera, mmPerPx } = placeCamera(rng, pattern.bed, opts);
  const target = placeTarget(rng, pattern.bed, camera, mmPerPx, opts);
  const cover = bedCover(pattern, opts, target);
  const discs = new DiscGrid();
  const { holes, misplaced } = placeHoles(rng, pattern, errors, camera, mmPerPx, opts, cover, discs);
  scatterScrewsAndDust(rng, pattern.bed, opts, discs);
  const lightAngleRad = rng() * 2 * Math.PI;
  const shade = makeShader({ opts, squareMm: target.sizeMm, panels: errors.panels, cover, discs, lightAngleRad });
  const [sheetHalfW, sheetHalfH] = target.sheetHalfMm;
  return {
    options: opts,
    pattern,
    camera,
    holes,
    target: { sizeMm: target.sizeMm, centreMm: target.centreMm, rotationRad: target.rotationRad, cornersBed: target.cornersBed, cornersPx: target.cornersPx, sheetMm: [2 * sheetHalfW, 2 * sheetHalfH] },
    errors: {
      scaleX: errors.scaleX,
      scaleY: errors.scaleY,
      squarenessDeg: errors.squarenessDeg,
      panels: errors.panels.map((p) => ({ id: p.id, dx: p.dx, dy: p.dy, rotationDeg: p.rotationDeg })),
      misplaced,
    },
    mmPerPx,
    shade,
  };
}

/** Sensor noise helper re-exported for the renderer. */
export { gauss };
export type { Rng };
