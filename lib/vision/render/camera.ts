/**
 * Pinhole camera with Brown–Conrady radial distortion (k1, k2), for the renderer.
 *
 * Frames: bed (world) in mm, origin front-left, +X right, +Y away from the operator, +Z up out of the bed;
 * camera: +x right, +y down, +z forward along the optical axis; image in px, origin top-left, +y down.
 * Projection: x_c = R (P − C); (x, y) = (x_c/z_c, y_c/z_c); f(r²) = 1 + k1 r² + k2 r⁴;
 * u = focalPx · x · f + cx, v = focalPx · y · f + cy.
 */

export interface Camera {
  /** Focal length, px. */
  focalPx: number;
  /** Principal point, px. */
  cx: number;
  cy: number;
  /** Radial distortion coefficients on normalised coordinates (dimensionless). */
  k1: number;
  k2: number;
  /** World → camera rotation, row-major 3 × 3. */
  R: number[];
  /** Camera centre in the bed frame, mm. */
  C: [number, number, number];
}

/** Rotation about a unit axis (x, y, z) by angleRad, row-major 3 × 3 (Rodrigues). */
export function axisAngle(ax: number, ay: number, az: number, angleRad: number): number[] {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  const t = 1 - c;
  return [
    t * ax * ax + c, t * ax * ay - s * az, t * ax * az + s * ay,
    t * ax * ay + s * az, t * ay * ay + c, t * ay * az - s * ax,
    t * ax * az - s * ay, t * ay * az + s * ax, t * az * az + c,
  ];
}

/** Product of two row-major 3 × 3 matrices. */
export function mul3(a: number[], b: number[]): number[] {
  const o = new Array<number>(9).fill(0);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k < 3; k++) s += a[i * 3 + k]! * b[k * 3 + j]!;
      o[i * 3 + j] = s;
    }
  return o;
}

/** Project a bed point (mm, on Z = 0 unless given) to image px; null when behind the camera. */
export function projectBed(cam: Camera, X: number, Y: number, Z = 0): [number, number] | null {
  const R = cam.R;
  const dx = X - cam.C[0];
  const dy = Y - cam.C[1];
  const dz = Z - cam.C[2];
  const xc = R[0]! * dx + R[1]! * dy + R[2]! * dz;
  const yc = R[3]! * dx + R[4]! * dy + R[5]! * dz;
  const zc = R[6]! * dx + R[7]! * dy + R[8]! * dz;
  if (zc <= 0) return null;
  const x = xc / zc;
  const y = yc / zc;
  const r2 = x * x + y * y;
  const f = 1 + cam.k1 * r2 + cam.k2 * r2 * r2;
  return [cam.focalPx * x * f + cam.cx, cam.focalPx * y * f + cam.cy];
}

/**
 * Inverse of `projectBed` on the bed plane Z = 0: image px → bed mm. Removes the distortion by fixed-point
 * iteration (converges for the mild distortion of phone lenses, |k1 r²| < 0.2).
 * Writes the result into out[0], out[1].
 */
export function pixelToBed(cam: Camera, u: number, v: number, out: Float64Array | number[]): void {
  const xd = (u - cam.cx) / cam.focalPx;
  const yd = (v - cam.cy) / cam.focalPx;
  let x = xd;
  let y = yd;
  for (let i = 0; i < 8; i++) {
    const r2 = x * x + y * y;
    const f = 1 + cam.k1 * r2 + cam.k2 * r2 * r2;
    x = xd / f;
    y = yd / f;
  }
  const R = cam.R;
  // world direction = Rᵀ (x, y, 1)
  const wx = R[0]! * x + R[3]! * y + R[6]!;
  const wy = R[1]! * x + R[4]! * y + R[7]!;
  const wz = R[2]! * x + R[5]! * y + R[8]!;
  const t = -cam.C[2] / wz;
  out[0] = cam.C[0] + t * wx;
  out[1] = cam.C[1] + t * wy;
}
