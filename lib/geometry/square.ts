/**
 * The reference square: ordering its four image corners (px), checking they form a convex quadrilateral, and
 * its homography from the square's own metric frame (mm; corner 0 at (0, 0), +X toward corner 1, +Y toward
 * corner 3, oriented like the bed: +X to the image's right, +Y up the image) to image px.
 */
import { GeometryInputError } from './errors';
import { homographyDlt, type Pt } from './homography';
import type { Mat3 } from './linalg';

/** Corners reordered counter-clockwise as seen with +y up, starting at the one nearest the bottom-left. */
export function orderSquareCorners(corners: readonly Pt[]): [Pt, Pt, Pt, Pt] {
  if (corners.length !== 4) throw new GeometryInputError('reference.corners', 'needs exactly four corners');
  const c = corners.map((p) => [p[0], p[1]] as Pt);
  // Convex, simple quadrilateral in the given order: all turns of one sign.
  let sign = 0;
  let area = 0;
  for (let i = 0; i < 4; i++) {
    const a = c[i]!, b = c[(i + 1) % 4]!, d = c[(i + 2) % 4]!;
    const cr = (b[0] - a[0]) * (d[1] - b[1]) - (b[1] - a[1]) * (d[0] - b[0]);
    area += a[0] * b[1] - b[0] * a[1];
    if (Math.abs(cr) < 1e-9) throw new GeometryInputError('reference.corners', 'three corners lie on one line; they must form a convex quadrilateral');
    if (sign === 0) sign = Math.sign(cr);
    else if (Math.sign(cr) !== sign) throw new GeometryInputError('reference.corners', 'the corners do not form a convex quadrilateral in the order given');
  }
  if (Math.abs(area) / 2 < 400) throw new GeometryInputError('reference.corners', 'the square is smaller than 20 px across');
  // In image coordinates (y down) a positive cross product is clockwise on screen; we want counter-clockwise as seen.
  const ordered = sign > 0 ? [c[0]!, c[3]!, c[2]!, c[1]!] : c;
  const mx = (ordered[0]![0] + ordered[1]![0] + ordered[2]![0] + ordered[3]![0]) / 4;
  const my = (ordered[0]![1] + ordered[1]![1] + ordered[2]![1] + ordered[3]![1]) / 4;
  let start = 0, best = Infinity;
  ordered.forEach((p, i) => {
    const ang = Math.atan2(-(p[1] - my), p[0] - mx);
    const d = Math.abs(Math.atan2(Math.sin(ang + 0.75 * Math.PI), Math.cos(ang + 0.75 * Math.PI)));
    if (d < best) { best = d; start = i; }
  });
  return [0, 1, 2, 3].map((k) => ordered[(start + k) % 4]!) as [Pt, Pt, Pt, Pt];
}

/** The square's metric corners (mm) in its own frame, in the order of `orderSquareCorners`. */
export const squareCornersMm = (sizeMm: number): [Pt, Pt, Pt, Pt] => [[0, 0], [sizeMm, 0], [sizeMm, sizeMm], [0, sizeMm]];

/** Homography from the square's metric frame (mm) to image px through four ordered corners. */
export function squareHomography(ordered: readonly Pt[], sizeMm: number): Mat3 {
  return homographyDlt(squareCornersMm(sizeMm), ordered);
}

/** True if image point (x, y) lies inside the convex quadrilateral `quad` grown by `padPx` (px). */
export function insideQuad(quad: readonly Pt[], x: number, y: number, padPx = 0): boolean {
  let area = 0;
  for (let i = 0; i < 4; i++) { const a = quad[i]!, b = quad[(i + 1) % 4]!; area += a[0] * b[1] - b[0] * a[1]; }
  const orient = Math.sign(area);
  for (let i = 0; i < 4; i++) {
    const a = quad[i]!, b = quad[(i + 1) % 4]!;
    const ex = b[0] - a[0], ey = b[1] - a[1];
    const d = (orient * (ex * (y - a[1]) - ey * (x - a[0]))) / Math.hypot(ex, ey);
    if (d < -padPx) return false;
  }
  return true;
}
