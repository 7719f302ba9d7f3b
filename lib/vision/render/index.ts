/** The photo renderer: a pattern and scene options → JPEG bytes and the exact truth. */
import type { Pattern } from '@/lib/geometry/contract';
import { develop, encodeJpeg, renderLinear, renderScene, CAMERA_PIPELINES, type CameraPipeline } from './render';
import { buildScene, DEFAULT_SCENE, type SceneOptions, type TruthHole } from './scene';

export interface Truth {
  version: 1;
  pattern: string;
  options: SceneOptions;
  image: { width: number; height: number; focalPx: number };
  camera: { focalPx: number; cx: number; cy: number; k1: number; k2: number; R: number[]; C: [number, number, number] };
  mmPerPx: number;
  /** The reference square: outer size, its corners in order 0..3 (mark corner first) in bed mm and image px. */
  target: { sizeMm: number; centreMm: [number, number]; rotationDeg: number; cornersBed: [number, number][]; cornersPx: [number, number][]; sheetMm?: [number, number] };
  holes: TruthHole[];
  errors: { scaleX: number; scaleY: number; squarenessDeg: number; panels: { id: string; dx: number; dy: number; rotationDeg: number }[]; misplaced: { family: string; col: number; row: number; dx: number; dy: number }[] };
}

function truthOf(scene: ReturnType<typeof buildScene>, pattern: Pattern, opts: SceneOptions): Truth {
  const cam = scene.camera;
  return {
    version: 1,
    pattern: pattern.name,
    options: opts,
    image: { width: opts.width, height: opts.height, focalPx: cam.focalPx },
    camera: { focalPx: cam.focalPx, cx: cam.cx, cy: cam.cy, k1: cam.k1, k2: cam.k2, R: cam.R, C: cam.C },
    mmPerPx: scene.mmPerPx,
    target: { sizeMm: scene.target.sizeMm, centreMm: scene.target.centreMm, rotationDeg: (scene.target.rotationRad * 180) / Math.PI, cornersBed: scene.target.cornersBed, cornersPx: scene.target.cornersPx, sheetMm: scene.target.sheetMm },
    holes: scene.holes,
    errors: scene.errors,
  };
}

/** Renders a scene for the pattern; options default to DEFAULT_SCENE. */
export async function synthesize(pattern: Pattern, options: Partial<SceneOptions> = {}): Promise<{ jpeg: Buffer; truth: Truth }> {
  const opts = { ...DEFAULT_SCENE, ...options };
  const scene = buildScene(pattern, opts);
  const { jpeg } = await renderScene(scene);
  return { jpeg, truth: truthOf(scene, pattern, opts) };
}

/**
 * One scene through several camera pipelines: the scene is ray cast once, then each pipeline develops a copy of
 * the same linear light (same noise), so the photos differ only by the camera. The truth is shared.
 */
export async function synthesizeCameras(pattern: Pattern, options: Partial<SceneOptions>, cameras: readonly CameraPipeline[] = CAMERA_PIPELINES): Promise<{ jpegs: Record<CameraPipeline, Buffer>; truth: Truth }> {
  const opts = { ...DEFAULT_SCENE, ...options };
  const scene = buildScene(pattern, opts);
  const planes = renderLinear(scene);
  const jpegs = {} as Record<CameraPipeline, Buffer>;
  for (const c of cameras) {
    const copy: typeof planes = [Float32Array.from(planes[0]), Float32Array.from(planes[1]), Float32Array.from(planes[2])];
    jpegs[c] = await encodeJpeg(develop(copy, opts, c), opts);
  }
  return { jpegs, truth: truthOf(scene, pattern, { ...opts }) };
}

export { CAMERA_PIPELINES, type CameraPipeline };
export { DEFAULT_SCENE, type SceneOptions, type TruthHole };
