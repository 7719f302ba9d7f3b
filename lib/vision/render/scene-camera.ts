/**
 * Where a rendered scene's camera stands: tilted and turned as asked, looking at the bed centre from the distance at
 * which the whole bed fills about 94 % of the photo. Bed frame: mm, origin front-left, +X right, +Y away, +Z up;
 * image: px, origin top-left, +y down (camera.ts).
 */
import { axisAngle, mul3, projectBed, type Camera } from './camera';
import type { Rng } from './rng';
import type { SceneOptions } from './scene';

/** Diagonal of the 36 × 24 mm frame that 35 mm-equivalent focal lengths refer to, mm. */
const FULL_FRAME_DIAGONAL_MM = Math.hypot(36, 24);
/** The bed's outline reaches this fraction of the half-width and half-height of the photo. */
const FILL = 0.47;

/**
 * Places the camera over the bed (bed mm) for the photo size (px); draws the tilt's direction from the random
 * stream. Returns the camera and the scale at the bed centre, mm per px.
 */
export function placeCamera(rng: Rng, bed: { width: number; height: number }, opts: Pick<SceneOptions, 'width' | 'height' | 'focal35mm' | 'tiltDeg' | 'turnDeg' | 'k1' | 'k2'>): { camera: Camera; mmPerPx: number } {
  const bw = bed.width;
  const bh = bed.height;
  const cx0 = bw / 2;
  const cy0 = bh / 2;
  const focalPx = (opts.focal35mm / FULL_FRAME_DIAGONAL_MM) * Math.hypot(opts.width, opts.height);
  const tiltRad = (opts.tiltDeg * Math.PI) / 180;
  const tiltDirectionRad = rng() * 2 * Math.PI;
  const turnRad = (opts.turnDeg * Math.PI) / 180;
  const lookingDown = [1, 0, 0, 0, -1, 0, 0, 0, -1];
  const tilt = axisAngle(Math.cos(tiltDirectionRad), Math.sin(tiltDirectionRad), 0, tiltRad);
  const turn = axisAngle(0, 0, 1, turnRad);
  const R = mul3(mul3(turn, tilt), lookingDown);
  const opticalAxis = [R[6]!, R[7]!, R[8]!]; // in the bed frame: Rᵀ e_z
  const camera: Camera = { focalPx, cx: opts.width / 2, cy: opts.height / 2, k1: opts.k1, k2: opts.k2, R, C: [0, 0, 0] };
  const standAt = (distanceMm: number) => {
    camera.C = [cx0 - distanceMm * opticalAxis[0]!, cy0 - distanceMm * opticalAxis[1]!, -distanceMm * opticalAxis[2]!];
  };
  // a first guess, then scale the distance by how far the bed's corners and side middles reach past the fill
  let distanceMm = focalPx * 0.001 * Math.max(bw, bh) * 1.2;
  const outline = [[0, 0], [bw, 0], [bw, bh], [0, bh], [cx0, 0], [cx0, bh], [0, cy0], [bw, cy0]] as const;
  for (let it = 0; it < 6; it++) {
    standAt(distanceMm);
    let reach = 0;
    for (const [X, Y] of outline) {
      const p = projectBed(camera, X, Y)!;
      reach = Math.max(reach, Math.abs(p[0] - camera.cx) / (FILL * opts.width), Math.abs(p[1] - camera.cy) / (FILL * opts.height));
    }
    distanceMm *= reach;
  }
  standAt(distanceMm);
  const pc = projectBed(camera, cx0, cy0)!;
  const px1 = projectBed(camera, cx0 + 1, cy0)!;
  return { camera, mmPerPx: 1 / Math.hypot(px1[0] - pc[0], px1[1] - pc[1]) };
}

/** The bed point (mm) under image point (u, v) px, ignoring the lens distortion (enough to place things). */
export function undistortedPixelToBed(camera: Camera, u: number, v: number): [number, number] {
  const R = camera.R;
  const xd = (u - camera.cx) / camera.focalPx;
  const yd = (v - camera.cy) / camera.focalPx;
  const wx = R[0]! * xd + R[3]! * yd + R[6]!;
  const wy = R[1]! * xd + R[4]! * yd + R[7]!;
  const wz = R[2]! * xd + R[5]! * yd + R[8]!;
  const t = -camera.C[2] / wz;
  return [camera.C[0] + t * wx, camera.C[1] + t * wy];
}
