/** The photo renderer: a pattern and scene options → JPEG bytes and the exact truth. */
import type { Pattern } from '@/lib/geometry/contract';
import { renderScene } from './render';
import { buildScene, DEFAULT_SCENE, type SceneOptions, type TruthHole } from './scene';

export interface Truth {
  version: 1;
  pattern: string;
  options: SceneOptions;
  image: { width: number; height: number; focalPx: number };
  camera: { focalPx: number; cx: number; cy: number; k1: number; k2: number; R: number[]; C: [number, number, number] };
  mmPerPx: number;
  /** The reference square: outer size, its corners in order 0..3 (mark corner first) in bed mm and image px. */
  target: { sizeMm: number; centreMm: [number, number]; rotationDeg: number; cornersBed: [number, number][]; cornersPx: [number, number][] };
  holes: TruthHole[];
  errors: { scaleX: number; scaleY: number; squarenessDeg: number; panels: { id: string; dx: number; dy: number; rotationDeg: number }[]; misplaced: { family: string; col: number; row: number; dx: number; dy: number }[] };
}

/** Renders a scene for the pattern; options default to DEFAULT_SCENE. */
export async function synthesize(pattern: Pattern, options: Partial<SceneOptions> = {}): Promise<{ jpeg: Buffer; truth: Truth }> {
  const opts = { ...DEFAULT_SCENE, ...options };
  const scene = buildScene(pattern, opts);
  const { jpeg } = await renderScene(scene);
  const cam = scene.camera;
  const truth: Truth = {
    version: 1,
    pattern: pattern.name,
    options: opts,
    image: { width: opts.width, height: opts.height, focalPx: cam.focalPx },
    camera: { focalPx: cam.focalPx, cx: cam.cx, cy: cam.cy, k1: cam.k1, k2: cam.k2, R: cam.R, C: cam.C },
    mmPerPx: scene.mmPerPx,
    target: { sizeMm: scene.target.sizeMm, centreMm: scene.target.centreMm, rotationDeg: (scene.target.rotationRad * 180) / Math.PI, cornersBed: scene.target.cornersBed, cornersPx: scene.target.cornersPx },
    holes: scene.holes,
    errors: scene.errors,
  };
  return { jpeg, truth };
}

export { DEFAULT_SCENE, type SceneOptions, type TruthHole };
