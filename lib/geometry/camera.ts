/**
 * Camera model: pinhole with square pixels, principal point (cx, cy) in image px (default the image centre),
 * focal length f in px, Brown–Conrady radial distortion k1, k2 on normalised coordinates (OpenCV's convention:
 * x_d = x (1 + k1 r² + k2 r⁴), r² = x² + y², x = X_c / Z_c).
 *
 * Frames: bed frame mm (origin front-left, +X right, +Y away from the operator, +Z up out of the bed);
 * camera frame mm (+x right, +y down in the image, +z along the view); image px (origin top-left, +y down).
 * A pose maps bed to camera: P_c = R (P_bed − C), C the camera centre in the bed frame.
 */
import type { Mat3 } from './linalg';

export interface Lens { fPx: number; cx: number; cy: number; k1: number; k2: number }
export interface Pose { /** Row-major rotation bed → camera. */ R: Mat3; /** Camera centre in the bed frame, mm. */ C: [number, number, number] }
export interface Camera extends Lens, Pose {}

/** Applies radial distortion to an ideal (undistorted) image point, px → px. */
export function distortPx(lens: Lens, u: number, v: number): [number, number] {
  const x = (u - lens.cx) / lens.fPx, y = (v - lens.cy) / lens.fPx;
  const r2 = x * x + y * y;
  const d = 1 + lens.k1 * r2 + lens.k2 * r2 * r2;
  return [lens.cx + lens.fPx * x * d, lens.cy + lens.fPx * y * d];
}

/** Points along a disc's rim whose image polygon gives the centroid of its image. */
const RIM_POINTS = 12;
/** cos and sin of the rim points' angles 2πi / RIM_POINTS, i = 0 … RIM_POINTS (the last closes the polygon). */
const RIM_COS = Float64Array.from({ length: RIM_POINTS + 1 }, (_, i) => Math.cos((2 * Math.PI * i) / RIM_POINTS));
const RIM_SIN = Float64Array.from({ length: RIM_POINTS + 1 }, (_, i) => Math.sin((2 * Math.PI * i) / RIM_POINTS));

/**
 * Centroid of the image of a disc of radius `radiusMm` about plane point (x, y) mm, px, through `map` (plane mm →
 * image px): the area centroid of the image polygon of its rim (Green's theorem). Not the image of the centre when
 * the map bends (perspective, lens); it is what a centroid or an ellipse fit of the disc's image measures.
 */
export function discImageCentroidPx(map: (x: number, y: number) => readonly [number, number], x: number, y: number, radiusMm: number): [number, number] {
  const out = new Float64Array(2);
  discImageCentroidInto((px, py, o) => { const [u, v] = map(px, py); o[0] = u; o[1] = v; }, x, y, radiusMm, out);
  return [out[0]!, out[1]!];
}

/**
 * discImageCentroidPx for a map that writes the image point (px) of plane point (x, y) mm into `o[0]`, `o[1]`; the
 * centroid (px) into `out` (for many discs without a new array per point).
 */
export function discImageCentroidInto(map: (x: number, y: number, o: Float64Array) => void, x: number, y: number, radiusMm: number, out: Float64Array): void {
  map(x, y, out);
  const u0 = out[0]!, v0 = out[1]!;
  let a = 0, cx = 0, cy = 0;
  map(x + radiusMm, y, out);
  let pu = out[0]! - u0, pv = out[1]! - v0;
  for (let i = 1; i <= RIM_POINTS; i++) {
    map(x + radiusMm * RIM_COS[i]!, y + radiusMm * RIM_SIN[i]!, out);
    const qu = out[0]! - u0, qv = out[1]! - v0;
    const c = pu * qv - qu * pv;
    a += c; cx += (pu + qu) * c; cy += (pv + qv) * c;
    pu = qu; pv = qv;
  }
  if (a === 0) { out[0] = u0; out[1] = v0; } else { out[0] = u0 + cx / (3 * a); out[1] = v0 + cy / (3 * a); }
}

/** Removes radial distortion from an observed image point (fixed-point iteration), px → px. */
export function undistortPx(lens: Lens, u: number, v: number, iterations = 8): [number, number] {
  const xd = (u - lens.cx) / lens.fPx, yd = (v - lens.cy) / lens.fPx;
  let x = xd, y = yd;
  for (let i = 0; i < iterations; i++) {
    const r2 = x * x + y * y;
    const d = 1 + lens.k1 * r2 + lens.k2 * r2 * r2;
    x = xd / d; y = yd / d;
  }
  return [lens.cx + lens.fPx * x, lens.cy + lens.fPx * y];
}

/** Projects a bed point (mm, Z = 0 unless given) to image px with distortion; null if behind the camera. */
export function projectBedPoint(cam: Camera, xMm: number, yMm: number, zMm = 0): [number, number] | null {
  const R = cam.R, dx = xMm - cam.C[0], dy = yMm - cam.C[1], dz = zMm - cam.C[2];
  const xc = R[0] * dx + R[1] * dy + R[2] * dz, yc = R[3] * dx + R[4] * dy + R[5] * dz, zc = R[6] * dx + R[7] * dy + R[8] * dz;
  if (zc <= 1e-9) return null;
  return distortPx(cam, cam.cx + cam.fPx * (xc / zc), cam.cy + cam.fPx * (yc / zc));
}

const norm3 = (v: number[]) => { const n = Math.hypot(v[0]!, v[1]!, v[2]!); return v.map((a) => a / n); };
const cross = (a: number[], b: number[]) => [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];

/**
 * Pose of a camera at `centreMm` looking at `targetMm` (bed frame), with the bed's +Y pointing up the image
 * and an extra roll (rad, counter-clockwise as seen in the image) about the view axis.
 */
export function lookAt(centreMm: [number, number, number], targetMm: [number, number, number], rollRad = 0): Pose {
  const z = norm3([targetMm[0] - centreMm[0], targetMm[1] - centreMm[1], targetMm[2] - centreMm[2]]);
  const up = [0, 1, 0];
  const dot = up[1]! * z[1]!;
  let y = norm3([-(up[0]! - dot * z[0]!), -(up[1]! - dot * z[1]!), -(up[2]! - dot * z[2]!)]);
  let x = cross(y, z);
  if (rollRad) {
    // The bed turns counter-clockwise as seen when the image axes turn clockwise (as seen) about the view axis.
    const c = Math.cos(rollRad), s = -Math.sin(rollRad);
    const x2 = x.map((a, i) => c * a - s * y[i]!), y2 = x.map((a, i) => s * a + c * y[i]!);
    x = x2; y = y2;
  }
  return { R: [x[0]!, x[1]!, x[2]!, y[0]!, y[1]!, y[2]!, z[0]!, z[1]!, z[2]!], C: centreMm };
}

/**
 * Focal length (px) from a metric plane-to-image homography (plane mm → undistorted image px) with known
 * principal point and square pixels (Zhang 2000, one view: orthogonality of the first two columns of K⁻¹H).
 * Returns null when the view is too close to fronto-parallel for the constraint to decide f.
 */
export function focalFromHomography(h: Mat3, cx: number, cy: number): number | null {
  const c1 = [h[0] - cx * h[6], h[3] - cy * h[6], h[6]], c2 = [h[1] - cx * h[7], h[4] - cy * h[7], h[7]];
  // f² from r1·r2 = 0 and from |r1| = |r2|; take the better-conditioned one.
  const cands: { f2: number; w: number }[] = [];
  const den1 = c1[2]! * c2[2]!;
  if (Math.abs(den1) > 0) cands.push({ f2: -(c1[0]! * c2[0]! + c1[1]! * c2[1]!) / den1, w: Math.abs(den1) });
  const den2 = c1[2]! ** 2 - c2[2]! ** 2;
  if (Math.abs(den2) > 0) cands.push({ f2: -(c1[0]! ** 2 + c1[1]! ** 2 - c2[0]! ** 2 - c2[1]! ** 2) / den2, w: Math.abs(den2) });
  const good = cands.filter((c) => c.f2 > 0).sort((a, b) => b.w - a.w)[0];
  if (!good) return null;
  // Perspective must be strong enough: compare the projective terms with the column scale.
  const scale = Math.hypot(c1[0]!, c1[1]!);
  const tilt = Math.sqrt(good.w) * Math.sqrt(good.f2) / scale;
  if (!(tilt > 0.03)) return null;
  return Math.sqrt(good.f2);
}

/** A default focal length (px) when neither EXIF nor the geometry gives one: a 26 mm-equivalent lens. */
export const defaultFocalPx = (widthPx: number, heightPx: number): number => (26 / 43.27) * Math.hypot(widthPx, heightPx);
