/** The slice of opencv-wasm (OpenCV 4.3 compiled to WebAssembly) the geometry tests use as an independent reference. */
import { createRequire } from 'node:module';

export interface CvMat { data64F: Float64Array; data32F: Float32Array; delete(): void }
export interface Cv {
  CV_64F: number;
  CV_64FC2: number;
  CV_32F: number;
  CV_32FC2: number;
  Mat: new () => CvMat;
  matFromArray(rows: number, cols: number, type: number, data: number[]): CvMat;
  findHomography(src: CvMat, dst: CvMat): CvMat;
  getPerspectiveTransform(src: CvMat, dst: CvMat): CvMat;
  undistort(src: CvMat, dst: CvMat, K: CvMat, D: CvMat): void;
}

const require = createRequire(import.meta.url);
export const loadCv = (): Cv => (require('opencv-wasm') as { cv: Cv }).cv;
