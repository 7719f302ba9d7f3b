/**
 * Contours of a thresholded 8-bit grey plane (image px of that plane) with opencv-wasm, and the Mats they need
 * deleted again: the grey plane's Mat, the binary image, the contour list and its hierarchy, and each contour.
 */
import { matFromGrey, type CV, type CvMat } from './cv';

/** opencv-wasm's MatVector of contours (loosely typed by the package). */
export interface ContourList {
  size(): number;
  get(i: number): CvMat;
  delete(): void;
}

/** The Mats a threshold-and-contours pass works in: `src` holds the grey plane, `bin`, `contours` and `hier` start empty. */
export interface ContourMats {
  src: CvMat;
  bin: CvMat;
  contours: ContourList;
  hier: CvMat;
}

/** Runs `fn` with the grey plane (8 bit, `width` × `height` px) as a Mat and empty Mats for a threshold and its contours; deletes all four afterwards, also when `fn` throws. */
export function withContourMats<T>(cv: CV, grey: Uint8Array, width: number, height: number, fn: (m: ContourMats) => T): T {
  const src = matFromGrey(cv, grey, width, height);
  const bin = new cv.Mat() as CvMat;
  const contours = new cv.MatVector() as ContourList;
  const hier = new cv.Mat() as CvMat;
  try {
    return fn({ src, bin, contours, hier });
  } finally {
    src.delete();
    bin.delete();
    contours.delete();
    hier.delete();
  }
}

/** Calls `fn` with each contour of `contours` and its index, deleting the contour after it, also when `fn` throws. */
export function forEachContour(contours: ContourList, fn: (c: CvMat, i: number) => void): void {
  const n = contours.size();
  for (let i = 0; i < n; i++) {
    const c = contours.get(i);
    try {
      fn(c, i);
    } finally {
      c.delete();
    }
  }
}
