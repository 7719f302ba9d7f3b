/** Lazy opencv-wasm loader (one instance per process; its Mats live in wasm memory and must be deleted). */
import type * as OpenCV from 'opencv-wasm/types/opencv';

/** A Mat (opencv-wasm types its classes loosely). */
export interface CvMat {
  rows: number;
  cols: number;
  data: Uint8Array;
  data32S: Int32Array;
  delete(): void;
}

export type CV = typeof OpenCV;

// The Emscripten module is a thenable, so it is wrapped in an object: a promise must never resolve to it.
let loaded: Promise<{ cv: CV }> | undefined;

/** Resolves to { cv } (never to the module itself). */
export function getCv(): Promise<{ cv: CV }> {
  loaded ??= import('opencv-wasm').then((m) => {
    const mod = m as unknown as { cv?: CV; default?: { cv: CV } };
    const cv = mod.cv ?? mod.default?.cv;
    if (!cv) throw new Error('opencv-wasm did not load');
    return { cv };
  });
  return loaded;
}

/** Copies an 8-bit grey plane into a new CV_8UC1 Mat (the caller deletes it). */
export function matFromGrey(cv: CV, data: Uint8Array, width: number, height: number): CvMat {
  const m = new cv.Mat(height, width, cv.CV_8UC1) as CvMat;
  m.data.set(data);
  return m;
}
