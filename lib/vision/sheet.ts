/**
 * The reference sheet's outline: the paper around the printed square, which hides the holes under it and cuts the
 * rims of those along its edges. Found from the square outwards: along each side, at stations spread over the
 * square's span, a march across the white margin until the grey falls to half-way between the paper's level and
 * the bed surface's and stays there over `RUN_MM` (a printed tick or letter is shorter), then a robust straight
 * line per side through those edge points; the corners are where neighbouring lines meet. A side whose edge cannot
 * be seen (a bed as light as the paper, or too few stations agreeing) keeps the white margin the print guarantees
 * (`paperMarginMm`), so the outline is never smaller than the printed sheet is known to be; a side running off the
 * photo lies where the march left it.
 *
 * Frames: target frame, mm (target.ts: corners (0,0), (S,0), (S,S), (0,S)); image px (origin top-left, +y down).
 * `H` maps the target frame to image px.
 */
import { applyH, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { sampleGrey } from './square';
import { paperMarginMm } from './target';

/** Length the grey must stay below the half-way level for an edge, mm. */
export const RUN_MM = 6;
const STATIONS = 15;

export interface SheetOutline {
  /** Corners in the target frame, mm, in order around the sheet (the square's corners' order). */
  cornersMm: [number, number][];
  /** The same in image px (may lie off the photo). */
  cornersPx: [number, number][];
  /** Per side (below y = 0, right of x = S, above y = S, left of x = 0): seen in the photo or the print's margin. */
  sides: ('seen' | 'margin' | 'off-photo')[];
}

/** Line d = a + b·u fitted robustly (least squares, then twice without points beyond 3 MADs). */
function robustLine(pts: [number, number][]): { a: number; b: number; n: number } | null {
  let use = pts;
  let fit: { a: number; b: number } | null = null;
  for (let it = 0; it < 3; it++) {
    if (use.length < 4) return null;
    const n = use.length;
    const mu = use.reduce((s, p) => s + p[0], 0) / n;
    const md = use.reduce((s, p) => s + p[1], 0) / n;
    let suu = 0;
    let sud = 0;
    for (const p of use) {
      suu += (p[0] - mu) ** 2;
      sud += (p[0] - mu) * (p[1] - md);
    }
    const b = suu > 0 ? sud / suu : 0;
    fit = { a: md - b * mu, b };
    const res = pts.map((p) => Math.abs(p[1] - fit!.a - fit!.b * p[0]));
    const sorted = [...res].sort((x, y) => x - y);
    const mad = 1.4826 * sorted[Math.floor(sorted.length / 2)]! + 0.2;
    use = pts.filter((_, i) => res[i]! < 3 * mad);
  }
  return fit && use.length >= 4 ? { ...fit, n: use.length } : null;
}

/**
 * Finds the sheet around the square. `grey` is the full-resolution grey image (0–255), `surface` the bed surface's
 * grey level (e.g. the photo's median), `sizeMm` the square's outer size.
 */
export function findSheet(grey: Float32Array, w: number, h: number, H: Mat3, sizeMm: number, surface: number): SheetOutline {
  const S = sizeMm;
  const margin = paperMarginMm(S);
  // side k: point at station u (0..S along the side) and distance d outside it
  const at = (k: number, u: number, d: number): [number, number] =>
    k === 0 ? [u, -d] : k === 1 ? [S + d, u] : k === 2 ? [S - u, S + d] : [-d, S - u];
  const offsets: number[] = [];
  const slopes: number[] = [];
  const sides: SheetOutline['sides'] = [];
  const onPhoto = (p: [number, number]) => p[0] >= 0 && p[1] >= 0 && p[0] <= w - 1 && p[1] <= h - 1;
  for (let k = 0; k < 4; k++) {
    const stations = Array.from({ length: STATIONS }, (_, i) => ((i + 0.5) / STATIONS) * S);
    // the paper's level just outside the frame, over the whole side
    const paper: number[] = [];
    for (const u of stations)
      for (const f of [0.02, 0.03, 0.04]) {
        const p = applyH(H, ...at(k, u, f * S));
        if (onPhoto(p)) paper.push(sampleGrey(grey, w, h, p[0], p[1]));
      }
    paper.sort((a, b) => a - b);
    const P = paper[Math.floor(paper.length / 2)] ?? 0;
    if (paper.length < 8 || P - surface < 20) {
      offsets.push(margin);
      slopes.push(0);
      sides.push('margin');
      continue;
    }
    const T = (P + surface) / 2;
    const edges: [number, number][] = [];
    let offPhoto = 0;
    let reached = 0;
    for (const u of stations) {
      const step = 0.5 / Math.max(1e-9, homographyScale(H, ...at(k, u, 0.02 * S))); // half a pixel, mm
      const runN = Math.max(6, Math.ceil(RUN_MM / step));
      const vals: number[] = [];
      let found = -1;
      let d = 0.02 * S;
      for (; d < 3 * S; d += step) {
        const p = applyH(H, ...at(k, u, d));
        if (!onPhoto(p)) break;
        vals.push(sampleGrey(grey, w, h, p[0], p[1]));
        // the first crossing below T whose next RUN_MM stay (80 % of samples) below it
        const j = vals.length - 1 - runN;
        if (j >= 1 && vals[j]! < T && vals[j - 1]! >= T) {
          let below = 0;
          for (let q = j; q <= j + runN; q++) if (vals[q]! < T) below++;
          if (below >= 0.8 * (runN + 1)) {
            const dj = 0.02 * S + j * step;
            found = dj - step + (step * (vals[j - 1]! - T)) / (vals[j - 1]! - vals[j]!);
            break;
          }
        }
      }
      if (found > 0) edges.push([u, found]);
      else if (d < 3 * S) {
        offPhoto++;
        reached = Math.max(reached, d);
      }
    }
    const line = robustLine(edges);
    if (line && line.n >= 5) {
      offsets.push(line.a + line.b * (S / 2));
      slopes.push(line.b);
      sides.push('seen');
    } else if (offPhoto >= STATIONS / 2) {
      offsets.push(Math.max(margin, reached));
      slopes.push(0);
      sides.push('off-photo');
    } else {
      offsets.push(margin);
      slopes.push(0);
      sides.push('margin');
    }
  }
  // side k as a line in the target frame: points at(k, u, offset + slope (u − S/2))
  const linePts = (k: number): [[number, number], [number, number]] => [at(k, 0, offsets[k]! - slopes[k]! * (S / 2)), at(k, S, offsets[k]! + slopes[k]! * (S / 2))];
  const meet = (k: number, l: number): [number, number] => {
    const [p1, p2] = linePts(k);
    const [p3, p4] = linePts(l);
    const d1x = p2[0] - p1[0], d1y = p2[1] - p1[1], d2x = p4[0] - p3[0], d2y = p4[1] - p3[1];
    const den = d1x * d2y - d1y * d2x;
    const t = ((p3[0] - p1[0]) * d2y - (p3[1] - p1[1]) * d2x) / den;
    return [p1[0] + t * d1x, p1[1] + t * d1y];
  };
  // corner 0 (by the square's corner 0) is where the left side (3) meets the bottom (0), and so on
  const cornersMm = [meet(3, 0), meet(0, 1), meet(1, 2), meet(2, 3)];
  return { cornersMm, cornersPx: cornersMm.map((c) => applyH(H, c[0], c[1])), sides };
}

/**
 * Distance (mm) from a point of the target frame to a convex outline, negative inside. The outline's corners are in
 * order around it (either sense).
 */
export function signedDistanceToOutline(poly: [number, number][], x: number, y: number): number {
  let area = 0;
  for (let i = 0; i < poly.length; i++) {
    const a = poly[i]!;
    const b = poly[(i + 1) % poly.length]!;
    area += a[0] * b[1] - b[0] * a[1];
  }
  const o = Math.sign(area) || 1;
  let inside = true;
  let best = Infinity;
  for (let i = 0; i < poly.length; i++) {
    const a = poly[i]!;
    const b = poly[(i + 1) % poly.length]!;
    const ex = b[0] - a[0];
    const ey = b[1] - a[1];
    const L = Math.hypot(ex, ey);
    const side = (o * (ex * (y - a[1]) - ey * (x - a[0]))) / L;
    if (side < 0) inside = false;
    const t = Math.max(0, Math.min(1, ((x - a[0]) * ex + (y - a[1]) * ey) / (L * L)));
    best = Math.min(best, Math.hypot(x - a[0] - t * ex, y - a[1] - t * ey));
  }
  return inside ? -best : best;
}
