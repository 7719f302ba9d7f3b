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

/** The full-resolution grey image (0–255) and its size, px. */
interface GreyPlane {
  grey: Float32Array;
  w: number;
  h: number;
}

const onPhoto = (img: GreyPlane, p: [number, number]) => p[0] >= 0 && p[1] >= 0 && p[0] <= img.w - 1 && p[1] <= img.h - 1;

/**
 * Target-frame point (mm) at station `u` (mm along side k, 0..S in the square's corner order) and `d` mm outside
 * side k (0: below y = 0, 1: right of x = S, 2: above y = S, 3: left of x = 0).
 */
function outsideSide(S: number, k: number, u: number, d: number): [number, number] {
  return k === 0 ? [u, -d] : k === 1 ? [S + d, u] : k === 2 ? [S - u, S + d] : [-d, S - u];
}

/** One side of the sheet: its distance outside the square's side at the side's middle (mm), its slope (mm per mm along the side) and how it was found. */
interface SheetSide {
  offset: number;
  slope: number;
  side: SheetOutline['sides'][number];
}

/** The paper's grey level just outside side k (median of samples at 2, 3 and 4 % of S outside, at each station), and how many samples lay on the photo. */
function paperLevel(img: GreyPlane, H: Mat3, S: number, k: number, stations: readonly number[]): { level: number; samples: number } {
  const paper: number[] = [];
  for (const u of stations)
    for (const f of [0.02, 0.03, 0.04]) {
      const p = applyH(H, ...outsideSide(S, k, u, f * S));
      if (onPhoto(img, p)) paper.push(sampleGrey(img.grey, img.w, img.h, p[0], p[1]));
    }
  paper.sort((a, b) => a - b);
  return { level: paper[Math.floor(paper.length / 2)] ?? 0, samples: paper.length };
}

/**
 * March outward from 2 % of S outside side k at station u (mm), half an image pixel a step, to the first crossing
 * below the grey level `T` whose next RUN_MM stay (80 % of samples) below it: its distance outside the side (mm,
 * interpolated between the samples; −1 when none) and where the march stopped (mm; below 3 S when it left the photo).
 */
function marchAcrossMargin(img: GreyPlane, H: Mat3, S: number, k: number, u: number, T: number): { edgeMm: number; stoppedMm: number } {
  const step = 0.5 / Math.max(1e-9, homographyScale(H, ...outsideSide(S, k, u, 0.02 * S))); // half a pixel, mm
  const runN = Math.max(6, Math.ceil(RUN_MM / step));
  const vals: number[] = [];
  let d = 0.02 * S;
  for (; d < 3 * S; d += step) {
    const p = applyH(H, ...outsideSide(S, k, u, d));
    if (!onPhoto(img, p)) break;
    vals.push(sampleGrey(img.grey, img.w, img.h, p[0], p[1]));
    const j = vals.length - 1 - runN;
    if (j >= 1 && vals[j]! < T && vals[j - 1]! >= T) {
      let below = 0;
      for (let q = j; q <= j + runN; q++) if (vals[q]! < T) below++;
      if (below >= 0.8 * (runN + 1)) {
        const dj = 0.02 * S + j * step;
        return { edgeMm: dj - step + (step * (vals[j - 1]! - T)) / (vals[j - 1]! - vals[j]!), stoppedMm: d };
      }
    }
  }
  return { edgeMm: -1, stoppedMm: d };
}

/**
 * Side k of the sheet (target frame, mm): where the grey falls half-way from the paper's level to the bed
 * `surface`'s, a robust line through the stations' edges (at least 5); a side whose march left the photo at half
 * the stations or more lies where the marches stopped; otherwise (no contrast, too few edges) the print's `margin`.
 */
function measureSheetSide(img: GreyPlane, H: Mat3, S: number, k: number, surface: number, margin: number): SheetSide {
  const stations = Array.from({ length: STATIONS }, (_, i) => ((i + 0.5) / STATIONS) * S);
  const paper = paperLevel(img, H, S, k, stations);
  if (paper.samples < 8 || paper.level - surface < 20) return { offset: margin, slope: 0, side: 'margin' };
  const T = (paper.level + surface) / 2;
  const edges: [number, number][] = [];
  let offPhoto = 0;
  let reached = 0;
  for (const u of stations) {
    const { edgeMm, stoppedMm } = marchAcrossMargin(img, H, S, k, u, T);
    if (edgeMm > 0) edges.push([u, edgeMm]);
    else if (stoppedMm < 3 * S) {
      offPhoto++;
      reached = Math.max(reached, stoppedMm);
    }
  }
  const line = robustLine(edges);
  if (line && line.n >= 5) return { offset: line.a + line.b * (S / 2), slope: line.b, side: 'seen' };
  if (offPhoto >= STATIONS / 2) return { offset: Math.max(margin, reached), slope: 0, side: 'off-photo' };
  return { offset: margin, slope: 0, side: 'margin' };
}

/** Where sheet sides k and l meet, target frame mm (side k: points outsideSide(k, u, offset + slope (u − S/2))). */
function sidesMeet(S: number, sides: readonly SheetSide[], k: number, l: number): [number, number] {
  const linePts = (i: number): [[number, number], [number, number]] => [outsideSide(S, i, 0, sides[i]!.offset - sides[i]!.slope * (S / 2)), outsideSide(S, i, S, sides[i]!.offset + sides[i]!.slope * (S / 2))];
  const [p1, p2] = linePts(k);
  const [p3, p4] = linePts(l);
  const d1x = p2[0] - p1[0], d1y = p2[1] - p1[1], d2x = p4[0] - p3[0], d2y = p4[1] - p3[1];
  const den = d1x * d2y - d1y * d2x;
  const t = ((p3[0] - p1[0]) * d2y - (p3[1] - p1[1]) * d2x) / den;
  return [p1[0] + t * d1x, p1[1] + t * d1y];
}

/**
 * Finds the sheet around the square. `grey` is the full-resolution grey image (0–255), `surface` the bed surface's
 * grey level (e.g. the photo's median), `sizeMm` the square's outer size; `H` target frame (mm) → image px.
 */
export function findSheet(grey: Float32Array, w: number, h: number, H: Mat3, sizeMm: number, surface: number): SheetOutline {
  const S = sizeMm;
  const margin = paperMarginMm(S);
  const img: GreyPlane = { grey, w, h };
  const sides = [0, 1, 2, 3].map((k) => measureSheetSide(img, H, S, k, surface, margin));
  // corner 0 (by the square's corner 0) is where the left side (3) meets the bottom (0), and so on
  const cornersMm = [sidesMeet(S, sides, 3, 0), sidesMeet(S, sides, 0, 1), sidesMeet(S, sides, 1, 2), sidesMeet(S, sides, 2, 3)];
  return { cornersMm, cornersPx: cornersMm.map((c) => applyH(H, c[0], c[1])), sides: sides.map((s) => s.side) };
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
