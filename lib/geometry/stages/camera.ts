/**
 * Stage 7 — the camera: focal length (px) and tilt. The metric homography (true bed mm → undistorted image px) is the
 * fitted one with the square's shape taken out; the focal length is the EXIF one, else the one that homography
 * implies when the view is oblique enough for it to be within 0.2–5 image diagonals, else the assumed one the fit
 * started from. The tilt from straight down is the angle of the bed's normal, r1 × r2 of K⁻¹ H, to the optical axis.
 * Lens terms k1, k2 are reported for that focal length (normalised radius scales with 1/f).
 */
import { invert2, type Mat2 } from '../affine';
import { PARAM, paramSigma, type BedModel } from '../bedfit';
import { focalFromHomography } from '../camera';
import type { Report } from '../contract';
import { mat3Mul, type Mat3 } from '../linalg';
import type { AnalysisInput } from './input';

const DEG = 180 / Math.PI;

export interface FocalLength {
  /** True bed mm → undistorted image px. */
  metricH: Mat3;
  focalPx: number;
  source: 'exif' | 'assumed' | 'estimated';
}

/** @param squareL lattice frame → true frame, linear part (shape.ts) */
export function focalLength(inp: AnalysisInput, model: BedModel, squareL: Mat2): FocalLength {
  const { width: W, height: H, startFocalPx } = inp.image;
  const exif = inp.points.image.focalPx;
  const metricH = mat3Mul(model.H, affineToMat3(invert2(squareL)));
  const fEst = exif ? null : focalFromHomography(metricH, W / 2, H / 2);
  const focalPx = exif ?? (fEst && fEst > 0.2 * Math.hypot(W, H) && fEst < 5 * Math.hypot(W, H) ? fEst : startFocalPx);
  return { metricH, focalPx, source: exif ? 'exif' : focalPx === startFocalPx ? 'assumed' : 'estimated' };
}

/** Camera tilt from straight down, degrees: the bed normal in the camera frame, r1 × r2 of K⁻¹ H (metric). */
export function tiltDeg(metricH: Mat3, focalPx: number, cx: number, cy: number): number {
  const kc = (j: number) => [(metricH[j]! - cx * metricH[6 + j]!) / focalPx, (metricH[3 + j]! - cy * metricH[6 + j]!) / focalPx, metricH[6 + j]!];
  const r1 = kc(0), r2 = kc(1);
  const r3 = [r1[1]! * r2[2]! - r1[2]! * r2[1]!, r1[2]! * r2[0]! - r1[0]! * r2[2]!, r1[0]! * r2[1]! - r1[1]! * r2[0]!];
  return Math.acos(Math.min(1, Math.abs(r3[2]!) / Math.hypot(r3[0]!, r3[1]!, r3[2]!))) * DEG;
}

/** The report's camera: focal length, lens terms with their 1σ (for that focal length), tilt, principal point. */
export function cameraReport(inp: AnalysisInput, model: BedModel, focal: FocalLength): Report['camera'] {
  const cx = inp.image.width / 2, cy = inp.image.height / 2;
  const rk = focal.focalPx / model.lens.fPx;
  return {
    focalPx: focal.focalPx, k1: model.lens.k1 * rk * rk, k2: model.lens.k2 * rk ** 4,
    uncertainty: { k1: knownOrNull(paramSigma(model, PARAM.k1) * rk * rk), k2: knownOrNull(paramSigma(model, PARAM.k2) * rk ** 4) },
    focalSource: focal.source, tiltDeg: tiltDeg(focal.metricH, focal.focalPx, cx, cy), principalPoint: { x: cx, y: cy },
  };
}

/** A 1σ the fit cannot state (its covariance not invertible, NaN) is unknown: null, as JSON would store it. */
const knownOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

const affineToMat3 = (L: Mat2): Mat3 => [L[0], L[1], 0, L[2], L[3], 0, 0, 0, 1];
