/**
 * Scoring detections against a rendered scene's truth (the renderer's exact projection of each true hole centre,
 * lib/vision/render/camera.ts, a code path the detector never uses). Image px; bed mm.
 */
import type { Points, Report } from '@/lib/geometry/contract';
import type { Truth } from '@/lib/vision/render';

export interface SceneScore {
  visible: number;
  found: number;
  foundFraction: number;
  /** RMS centre error over found holes, px. */
  rmsPx: number;
  maxPx: number;
  /** Detections matching no hole at all (visible or not). */
  falseDetections: number;
  cornerRmsPx: number;
}

/** Matches each visible true hole to the nearest detection within `gatePx`. */
export function scoreDetections(points: Points, truth: Truth, gatePx = 3): SceneScore {
  const vis = truth.holes.filter((h) => h.visible);
  let found = 0;
  let se = 0;
  let max = 0;
  for (const h of vis) {
    let bd = Infinity;
    for (const p of points.holes) bd = Math.min(bd, Math.hypot(p.x - h.px[0], p.y - h.px[1]));
    if (bd < gatePx) {
      found++;
      se += bd * bd;
      max = Math.max(max, bd);
    }
  }
  const falseDetections = points.holes.filter((p) => !truth.holes.some((h) => Math.hypot(p.x - h.px[0], p.y - h.px[1]) < gatePx)).length;
  let ce = 0;
  points.reference.corners.forEach((c, i) => {
    const t = truth.target.cornersPx[i]!;
    ce += (c[0] - t[0]) ** 2 + (c[1] - t[1]) ** 2;
  });
  return { visible: vis.length, found, foundFraction: found / Math.max(1, vis.length), rmsPx: Math.sqrt(se / Math.max(1, found)), maxPx: max, falseDetections, cornerRmsPx: Math.sqrt(ce / 4) };
}

/**
 * Position error through the fit: the report's measured positions against the true bed positions, after removing
 * the one rigid motion between the report's bed frame and the scene's (least squares, 2-D). mm.
 */
export function positionErrorMm(report: Report, truth: Truth): { rmsMm: number; n: number } {
  const pairs: [number, number, number, number][] = [];
  for (const p of report.positions) {
    if (!p.measured) continue;
    const t = truth.holes.find((h) => h.family === p.family && h.col === p.col && h.row === p.row);
    if (t?.visible) pairs.push([p.measured.x, p.measured.y, t.bed.x, t.bed.y]);
  }
  const n = pairs.length;
  if (n < 3) return { rmsMm: NaN, n };
  let ax = 0, ay = 0, bx = 0, by = 0;
  for (const [x, y, u, v] of pairs) {
    ax += x; ay += y; bx += u; by += v;
  }
  ax /= n; ay /= n; bx /= n; by /= n;
  let sc = 0, ss = 0;
  for (const [x, y, u, v] of pairs) {
    const px = x - ax, py = y - ay, qx = u - bx, qy = v - by;
    sc += px * qx + py * qy;
    ss += px * qy - py * qx;
  }
  const th = Math.atan2(ss, sc);
  const c = Math.cos(th), s = Math.sin(th);
  let se = 0;
  for (const [x, y, u, v] of pairs) {
    const px = x - ax, py = y - ay;
    se += (c * px - s * py + bx - u) ** 2 + (s * px + c * py + by - v) ** 2;
  }
  return { rmsMm: Math.sqrt(se / n), n };
}

/** RMS distance (2-D) of measured positions from the truth after the best least-squares similarity, mm. */
export function positionErrorAfterSimilarityMm(report: Report, truth: Truth): { rmsMm: number; n: number } {
  const P: [number, number, number, number][] = [];
  for (const p of report.positions) {
    if (!p.measured) continue;
    const t = truth.holes.find((h) => h.family === p.family && h.col === p.col && h.row === p.row);
    if (t?.visible) P.push([p.measured.x, p.measured.y, t.bed.x, t.bed.y]);
  }
  const n = P.length;
  if (n < 3) return { rmsMm: NaN, n };
  let ax = 0, ay = 0, bx = 0, by = 0;
  for (const [x, y, u, v] of P) { ax += x; ay += y; bx += u; by += v; }
  ax /= n; ay /= n; bx /= n; by /= n;
  // u + i v ≈ (a + i b)(x + i y) + t, least squares (Umeyama 1991 without the reflection case)
  let a = 0, b = 0, ss = 0;
  for (const [x, y, u, v] of P) {
    const px = x - ax, py = y - ay, qx = u - bx, qy = v - by;
    a += px * qx + py * qy;
    b += px * qy - py * qx;
    ss += px * px + py * py;
  }
  a /= ss; b /= ss;
  let se = 0;
  for (const [x, y, u, v] of P) {
    const px = x - ax, py = y - ay;
    se += (a * px - b * py + bx - u) ** 2 + (b * px + a * py + by - v) ** 2;
  }
  return { rmsMm: Math.sqrt(se / n), n };
}
