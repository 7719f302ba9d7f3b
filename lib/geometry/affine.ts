/**
 * 2-D affine fit y ≈ L x + t (least squares) and the decomposition of its linear part L into the lattice terms
 * used in reports: rotation of the X axis, scale X (length of L·e₁), scale Y (length of L·e₂) and squareness
 * (angle between L·e₁ and L·e₂ minus 90°). Units: the caller's for points; angles in radians.
 */

/** Row-major 2×2 [a, b, c, d] = [[a, b], [c, d]]. */
export type Mat2 = [number, number, number, number];

export interface Affine2 { L: Mat2; t: [number, number] }

/** Weighted least-squares affine fit from ≥ 3 non-collinear pairs. */
export function fitAffine(x: readonly (readonly [number, number])[], y: readonly (readonly [number, number])[], weights?: ArrayLike<number>): Affine2 {
  const n = x.length;
  let sw = 0, mx = 0, my = 0, ux = 0, uy = 0;
  for (let i = 0; i < n; i++) { const w = weights ? weights[i]! : 1; sw += w; mx += w * x[i]![0]; my += w * x[i]![1]; ux += w * y[i]![0]; uy += w * y[i]![1]; }
  mx /= sw; my /= sw; ux /= sw; uy /= sw;
  let sxx = 0, sxy = 0, syy = 0, a0 = 0, a1 = 0, b0 = 0, b1 = 0;
  for (let i = 0; i < n; i++) {
    const w = weights ? weights[i]! : 1;
    const px = x[i]![0] - mx, py = x[i]![1] - my, qx = y[i]![0] - ux, qy = y[i]![1] - uy;
    sxx += w * px * px; sxy += w * px * py; syy += w * py * py;
    a0 += w * qx * px; a1 += w * qx * py; b0 += w * qy * px; b1 += w * qy * py;
  }
  const det = sxx * syy - sxy * sxy;
  if (!(Math.abs(det) > 1e-300)) throw new RangeError('affine fit needs non-collinear points');
  const i00 = syy / det, i01 = -sxy / det, i11 = sxx / det;
  const L: Mat2 = [a0 * i00 + a1 * i01, a0 * i01 + a1 * i11, b0 * i00 + b1 * i01, b0 * i01 + b1 * i11];
  return { L, t: [ux - (L[0] * mx + L[1] * my), uy - (L[2] * mx + L[3] * my)] };
}

export interface AffineTerms { rotationRad: number; scaleX: number; scaleY: number; squarenessRad: number }

/** Decomposes L into rotation of L·e₁, |L·e₁|, |L·e₂| and ∠(L·e₁, L·e₂) − π/2. */
export function decomposeAffine(L: Mat2): AffineTerms {
  const ex = [L[0], L[2]], ey = [L[1], L[3]];
  const sx = Math.hypot(ex[0]!, ex[1]!), sy = Math.hypot(ey[0]!, ey[1]!);
  const between = Math.atan2(ex[0]! * ey[1]! - ex[1]! * ey[0]!, ex[0]! * ey[0]! + ex[1]! * ey[1]!);
  return { rotationRad: Math.atan2(ex[1]!, ex[0]!), scaleX: sx, scaleY: sy, squarenessRad: between - Math.PI / 2 };
}

/** Rebuilds L from the terms (inverse of decomposeAffine). */
export function composeAffine(t: AffineTerms): Mat2 {
  const ay = t.rotationRad + Math.PI / 2 + t.squarenessRad;
  return [t.scaleX * Math.cos(t.rotationRad), t.scaleY * Math.cos(ay), t.scaleX * Math.sin(t.rotationRad), t.scaleY * Math.sin(ay)];
}

export function invert2(L: Mat2): Mat2 {
  const det = L[0] * L[3] - L[1] * L[2];
  return [L[3] / det, -L[1] / det, -L[2] / det, L[0] / det];
}
