/**
 * Where the report's positions are in the photo, for drawing the overlay and the review. The report gives
 * positions in the bed frame (mm, origin front-left, +X right, +Y away from the operator) and the detections
 * are in the image frame (px, origin top-left, +y down); the report keeps no link between the two, so it is
 * rebuilt here:
 *
 * 1. The matched detections are exactly the detections not listed as unmatched, and they are the same holes
 *    as the report's measured positions, so the two point sets have the same centroid.
 * 2. Each detection is taken into the reference square's metric frame (mm, perspective removed by the
 *    square's homography, Hartley & Zisserman §2.7). That frame differs from the bed frame by a rotation and
 *    a translation only (both are right-handed seen from above), so a search over the turn with the centroids
 *    aligned, then nearest neighbours and a rigid fit (Umeyama 1991, 2-D case), recovers the pairs.
 * 3. A homography bed → image fitted to the pairs places the positions that were not seen.
 */
import type { Points, Report, Verdict } from '@/lib/geometry/contract';
import { fitHomography, type Pt } from '@/lib/geometry/homography';
import { applyH, mat3Inv, type Mat3 } from '@/lib/geometry/linalg';
import { orderSquareCorners, squareHomography } from '@/lib/geometry/square';
import { rigid2 } from '@/lib/geometry/umeyama';

export interface PhotoOverlay {
  /** Image px of each report position (same order as report.positions): its detection, or predicted when not seen; null when it cannot be placed. */
  positionPx: ({ x: number; y: number } | null)[];
  /** For each detection (points.holes order): index into report.positions, or −1 when unmatched. */
  detectionPosition: Int32Array;
  /** Verdict of each detection's position, or 'unmatched'. */
  detectionVerdict: (Verdict | 'unmatched')[];
  /** Bed mm → image px, fitted to the pairs; null when fewer than 4 pairs. */
  bedToImage: Mat3 | null;
}

const key = (x: number, y: number) => `${x}|${y}`;

class Grid {
  private cells = new Map<string, number[]>();
  constructor(private xs: ArrayLike<number>, private ys: ArrayLike<number>, private cell: number) {
    for (let i = 0; i < xs.length; i++) {
      const k = `${Math.floor(xs[i]! / cell)},${Math.floor(ys[i]! / cell)}`;
      const list = this.cells.get(k);
      if (list) list.push(i); else this.cells.set(k, [i]);
    }
  }
  /** Index of the nearest point within `gate`, or −1. */
  nearest(x: number, y: number, gate: number): number {
    const cx = Math.floor(x / this.cell), cy = Math.floor(y / this.cell);
    const reach = Math.ceil(gate / this.cell);
    let best = -1, bd = gate * gate;
    for (let i = -reach; i <= reach; i++) for (let j = -reach; j <= reach; j++) {
      for (const k of this.cells.get(`${cx + i},${cy + j}`) ?? []) {
        const d = (this.xs[k]! - x) ** 2 + (this.ys[k]! - y) ** 2;
        if (d <= bd) { bd = d; best = k; }
      }
    }
    return best;
  }
}

/** Smallest distance between two measured positions, mm (the lattice's finest spacing). */
function finestSpacing(xs: Float64Array, ys: Float64Array): number {
  const n = xs.length;
  let best = Infinity;
  const step = Math.max(1, Math.floor(n / 60));
  for (let i = 0; i < n; i += step) for (let j = 0; j < n; j++) {
    if (i === j) continue;
    const d = Math.hypot(xs[i]! - xs[j]!, ys[i]! - ys[j]!);
    if (d > 1e-6 && d < best) best = d;
  }
  return Number.isFinite(best) ? best : 25;
}

/**
 * Pairs the detections with the report's positions and places every position in the photo.
 * @param report the analysis report (bed mm)
 * @param points the detections it was computed from (image px)
 */
export function photoOverlay(report: Report, points: Points): PhotoOverlay {
  const holes = points.holes;
  const unmatchedKeys = new Set(report.unmatched.map((u) => key(u.x, u.y)));
  const detIdx: number[] = [];
  holes.forEach((h, i) => { if (!unmatchedKeys.has(key(h.x, h.y))) detIdx.push(i); });
  const posIdx: number[] = [];
  report.positions.forEach((p, i) => { if (p.measured) posIdx.push(i); });

  const detectionPosition = new Int32Array(holes.length).fill(-1);
  const out: PhotoOverlay = { positionPx: report.positions.map(() => null), detectionPosition, detectionVerdict: holes.map(() => 'unmatched'), bedToImage: null };
  if (detIdx.length < 3 || posIdx.length < 3) return out;

  let sqInv: Mat3;
  try {
    const corners = orderSquareCorners(points.reference.corners as unknown as Pt[]);
    sqInv = mat3Inv(squareHomography(corners, points.reference.sizeMm));
  } catch {
    return out;
  }
  // Detections in the square's metric frame, positions' measured bed mm.
  const sx = new Float64Array(detIdx.length), sy = new Float64Array(detIdx.length);
  detIdx.forEach((d, k) => { const [x, y] = applyH(sqInv, holes[d]!.x, holes[d]!.y); sx[k] = x; sy[k] = y; });
  const mx = Float64Array.from(posIdx, (p) => report.positions[p]!.measured!.x);
  const my = Float64Array.from(posIdx, (p) => report.positions[p]!.measured!.y);
  const mean = (a: Float64Array) => a.reduce((s, v) => s + v, 0) / a.length;
  const scx = mean(sx), scy = mean(sy), mcx = mean(mx), mcy = mean(my);
  const spacing = finestSpacing(mx, my);
  const grid = new Grid(mx, my, spacing);

  // The report states the bed's +X direction in the photo (counter-clockwise as seen, image y down): taken
  // into the square's frame it gives the turn, which settles the lattice's own symmetry (a rectangular
  // lattice matches itself turned 180°). Search ±15° about it in 0.5° steps, or all turns without it.
  const turns: number[] = [];
  const rDeg = report.lattice.rotationDeg;
  if (Number.isFinite(rDeg)) {
    const r = (rDeg * Math.PI) / 180;
    const cx = detIdx.reduce((s, d) => s + holes[d]!.x, 0) / detIdx.length, cy = detIdx.reduce((s, d) => s + holes[d]!.y, 0) / detIdx.length;
    const reach = 0.05 * Math.hypot(points.image.width, points.image.height);
    const a0 = applyH(sqInv, cx, cy), a1 = applyH(sqInv, cx + reach * Math.cos(r), cy - reach * Math.sin(r));
    const base = -Math.atan2(a1[1] - a0[1], a1[0] - a0[0]);
    for (let k = -30; k <= 30; k++) turns.push(base + (k * 0.5 * Math.PI) / 180);
  } else {
    for (let deg = 0; deg < 360; deg += 1) turns.push((deg * Math.PI) / 180);
  }
  // Scored by how many detections land near a position.
  const coarseGate = 0.3 * spacing;
  let bestTurn = 0, bestScore = -1;
  for (const a of turns) {
    const c = Math.cos(a), s = Math.sin(a);
    let score = 0;
    for (let k = 0; k < sx.length; k++) {
      const ax = sx[k]! - scx, ay = sy[k]! - scy;
      if (grid.nearest(mcx + c * ax - s * ay, mcy + s * ax + c * ay, coarseGate) >= 0) score++;
    }
    if (score > bestScore) { bestScore = score; bestTurn = a; }
  }

  // Refine: pairs by nearest neighbour, rigid fit, repeat with a tighter gate; one detection per position.
  let rot = bestTurn, tx = mcx - (Math.cos(rot) * scx - Math.sin(rot) * scy), ty = mcy - (Math.sin(rot) * scx + Math.cos(rot) * scy);
  let pairs: [number, number][] = [];
  for (const gate of [0.3 * spacing, 0.2 * spacing, 0.15 * spacing]) {
    const c = Math.cos(rot), s = Math.sin(rot);
    const claimed = new Map<number, { k: number; d: number }>();
    for (let k = 0; k < sx.length; k++) {
      const x = c * sx[k]! - s * sy[k]! + tx, y = s * sx[k]! + c * sy[k]! + ty;
      const j = grid.nearest(x, y, gate);
      if (j < 0) continue;
      const d = Math.hypot(mx[j]! - x, my[j]! - y);
      const prev = claimed.get(j);
      if (!prev || d < prev.d) claimed.set(j, { k, d });
    }
    pairs = [...claimed.entries()].map(([j, v]) => [v.k, j]);
    if (pairs.length < 2) break;
    const from = new Float64Array(2 * pairs.length), to = new Float64Array(2 * pairs.length);
    pairs.forEach(([k, j], i) => { from[2 * i] = sx[k]!; from[2 * i + 1] = sy[k]!; to[2 * i] = mx[j]!; to[2 * i + 1] = my[j]!; });
    const r = rigid2(from, to, pairs.length);
    rot = r.angleRad; tx = r.tx; ty = r.ty;
  }


  for (const [k, j] of pairs) {
    const d = detIdx[k]!, p = posIdx[j]!;
    detectionPosition[d] = p;
    out.detectionVerdict[d] = report.positions[p]!.verdict;
    out.positionPx[p] = { x: holes[d]!.x, y: holes[d]!.y };
  }
  if (pairs.length >= 4) {
    const src: Pt[] = pairs.map(([, j]) => [report.positions[posIdx[j]!]!.nominal.x, report.positions[posIdx[j]!]!.nominal.y]);
    const dst: Pt[] = pairs.map(([k]) => [holes[detIdx[k]!]!.x, holes[detIdx[k]!]!.y]);
    try {
      const H = fitHomography(src, dst);
      out.bedToImage = H;
      report.positions.forEach((p, i) => {
        if (out.positionPx[i]) return;
        const [x, y] = applyH(H, p.nominal.x, p.nominal.y);
        if (Number.isFinite(x) && Number.isFinite(y)) out.positionPx[i] = { x, y };
      });
    } catch { /* leave unseen positions unplaced */ }
  }
  return out;
}
