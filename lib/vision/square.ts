/**
 * Finding the reference square: candidate quadrilaterals from a dark-region threshold at reduced resolution
 * (opencv-wasm contours + polygon approximation), the one that is a square seen in perspective, then sub-pixel
 * corners at full resolution by fitting a line to the edge points of each side and intersecting neighbours.
 *
 * Frames: image px (origin top-left, +y down; pixel centres at integers). Corners are returned in order 0..3 of
 * the target frame (see target.ts): counter-clockwise seen from above, which is a negative shoelace area in
 * image coordinates; corner 0 is the one by the orientation mark, or for a plain square the one nearest the
 * photo's bottom-left.
 */
import { getCv, matFromGrey, type CvMat } from './cv';
import { applyH, homographyFrom4 } from './homography';
import { FRAME_FRACTION, MARK_CENTRE_FRACTION, MARK_FRACTION } from './target';

export type Corners = [[number, number], [number, number], [number, number], [number, number]];

export interface SquareFound {
  corners: Corners;
  kind: 'target' | 'square';
  /** Whether the orientation mark was seen (then corner 0 is the mark's corner). */
  markFound: boolean;
  /** RMS distance of the edge points from their fitted side lines, px. */
  edgeRmsPx: number;
}

interface Quad {
  pts: [number, number][];
  area: number;
  hole: boolean;
  parent: number;
  index: number;
}

function shoelace(p: readonly (readonly [number, number])[]): number {
  let s = 0;
  for (let i = 0; i < p.length; i++) {
    const a = p[i]!;
    const b = p[(i + 1) % p.length]!;
    s += a[0] * b[1] - b[0] * a[1];
  }
  return s / 2;
}

/** Plausible image of a square: convex, angles 40–140°, opposite sides within 1.8×, neighbours within 2.5×. */
function squareLike(p: [number, number][]): boolean {
  const side = (i: number) => Math.hypot(p[(i + 1) % 4]![0] - p[i]![0], p[(i + 1) % 4]![1] - p[i]![1]);
  const s = [0, 1, 2, 3].map(side);
  if (Math.min(...s) < 1e-6) return false;
  if (Math.max(s[0]!, s[2]!) / Math.min(s[0]!, s[2]!) > 1.8 || Math.max(s[1]!, s[3]!) / Math.min(s[1]!, s[3]!) > 1.8) return false;
  if (Math.max(...s) / Math.min(...s) > 2.5) return false;
  let sign = 0;
  for (let i = 0; i < 4; i++) {
    const a = p[(i + 3) % 4]!;
    const b = p[i]!;
    const c = p[(i + 1) % 4]!;
    const v1 = [a[0] - b[0], a[1] - b[1]];
    const v2 = [c[0] - b[0], c[1] - b[1]];
    const cross = v1[0]! * v2[1]! - v1[1]! * v2[0]!;
    if (sign === 0) sign = Math.sign(cross);
    else if (Math.sign(cross) !== sign) return false;
    const ang = (Math.acos((v1[0]! * v2[0]! + v1[1]! * v2[1]!) / (Math.hypot(v1[0]!, v1[1]!) * Math.hypot(v2[0]!, v2[1]!))) * 180) / Math.PI;
    if (ang < 40 || ang > 140) return false;
  }
  return true;
}

/** Bilinear sample of a float grey plane (clamped at the border). */
export function sampleGrey(g: Float32Array, w: number, h: number, x: number, y: number): number {
  const xf = x < 0 ? 0 : x > w - 1.001 ? w - 1.001 : x;
  const yf = y < 0 ? 0 : y > h - 1.001 ? h - 1.001 : y;
  const x0 = Math.floor(xf);
  const y0 = Math.floor(yf);
  const fx = xf - x0;
  const fy = yf - y0;
  const i = y0 * w + x0;
  const a = g[i]!;
  const b = g[i + 1]!;
  const c = g[i + w]!;
  const d = g[i + w + 1]!;
  return a + (b - a) * fx + (c - a) * fy + (a - b - c + d) * fx * fy;
}

/** sRGB-encoded grey (0–255) → linear light (0–1): edges are located where the optics blurred them, in linear light. */
const LINEAR = new Float64Array(1025).map((_, i) => {
  const c = i / 1024;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
});
function toLinear(v: number): number {
  const x = (v < 0 ? 0 : v > 255 ? 255 : v) * (1024 / 255);
  const i = Math.min(1023, Math.floor(x));
  return LINEAR[i]! + (LINEAR[i + 1]! - LINEAR[i]!) * (x - i);
}

/** Bilinear sample in linear light (each neighbour decoded before interpolating). */
function sampleLinear(g: Float32Array, w: number, h: number, x: number, y: number): number {
  const xf = x < 0 ? 0 : x > w - 1.001 ? w - 1.001 : x;
  const yf = y < 0 ? 0 : y > h - 1.001 ? h - 1.001 : y;
  const x0 = Math.floor(xf);
  const y0 = Math.floor(yf);
  const fx = xf - x0;
  const fy = yf - y0;
  const i = y0 * w + x0;
  const a = toLinear(g[i]!);
  const b = toLinear(g[i + 1]!);
  const c = toLinear(g[i + w]!);
  const d = toLinear(g[i + w + 1]!);
  return a + (b - a) * fx + (c - a) * fy + (a - b - c + d) * fx * fy;
}

/** Total-least-squares line through points: unit normal n and offset c with n·p = c. */
function fitLine(pts: [number, number][]): { n: [number, number]; c: number; rms: number } {
  const m = pts.length;
  let mx = 0;
  let my = 0;
  for (const p of pts) {
    mx += p[0];
    my += p[1];
  }
  mx /= m;
  my /= m;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (const p of pts) {
    const dx = p[0] - mx;
    const dy = p[1] - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const th = 0.5 * Math.atan2(2 * sxy, sxx - syy); // direction of largest spread
  const n: [number, number] = [-Math.sin(th), Math.cos(th)];
  const c = n[0] * mx + n[1] * my;
  let r = 0;
  for (const p of pts) r += (n[0] * p[0] + n[1] * p[1] - c) ** 2;
  return { n, c, rms: Math.sqrt(r / m) };
}

/**
 * Refines a quadrilateral's corners on the full-resolution grey image: along each side, edge points where the
 * intensity profile across the side steps from dark to light (located by the area under the normalised darkness), a robust line
 * fit per side, corners at the intersections of neighbouring sides. `reachPx` bounds the search across a side.
 */
export function refineCorners(grey: Float32Array, w: number, h: number, quad: Corners, reachPx: number): { corners: Corners; rms: number } | null {
  let q = quad;
  let rms = 0;
  const area = shoelace(q);
  for (let iter = 0; iter < 2; iter++) {
    // per side: lines through its first and its second half (a lens's bend of the side then hardly moves a corner)
    const halves: { a: { n: [number, number]; c: number }; b: { n: [number, number]; c: number } }[] = [];
    let rr = 0;
    for (let s = 0; s < 4; s++) {
      const a = q[s]!;
      const b = q[(s + 1) % 4]!;
      const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
      const t: [number, number] = [(b[0] - a[0]) / len, (b[1] - a[1]) / len];
      // outward normal: right of the tangent for a positive shoelace area, left for a negative one
      const out: [number, number] = area < 0 ? [-t[1], t[0]] : [t[1], -t[0]];
      const pts: [number, number][] = [];
      const fs: number[] = [];
      const nSamples = Math.max(12, Math.min(200, Math.floor(len / 2)));
      const reach = iter === 0 ? reachPx : Math.max(3, reachPx / 2);
      const step = 0.25;
      const nProf = Math.floor((2 * reach) / step) + 1;
      const prof = new Float64Array(nProf);
      for (let k = 0; k < nSamples; k++) {
        const f = 0.06 + (0.88 * k) / (nSamples - 1);
        const px = a[0] + (b[0] - a[0]) * f;
        const py = a[1] + (b[1] - a[1]) * f;
        for (let j = 0; j < nProf; j++) {
          const d = -reach + j * step;
          prof[j] = sampleLinear(grey, w, h, px + out[0] * d, py + out[1] * d);
        }
        let best = -1;
        let bestG = 0;
        for (let j = 2; j < nProf - 2; j++) {
          const g = prof[j + 2]! + prof[j + 1]! - prof[j - 1]! - prof[j - 2]!;
          if (g > bestG) {
            bestG = g;
            best = j;
          }
        }
        if (best < 3 || best > nProf - 4) continue;
        // the edge is where linear light crosses half-way between the dark and the light plateau around the step
        let lo = Infinity;
        let hi = -Infinity;
        for (let j = Math.max(0, best - 12); j <= best; j++) lo = Math.min(lo, prof[j]!);
        for (let j = best; j <= Math.min(nProf - 1, best + 12); j++) hi = Math.max(hi, prof[j]!);
        if (hi - lo < 1e-3) continue;
        // Edge by area, not by a level crossing: the dark length from the window's start equals the integral of
        // the normalised darkness (exact for a blurred or pixel-averaged step, whatever its sub-pixel phase).
        const jA = Math.max(0, best - 12);
        const jB = Math.min(nProf - 1, best + 12);
        let dark = 0;
        for (let j = jA; j < jB; j++) {
          const u0 = Math.min(1, Math.max(0, (hi - prof[j]!) / (hi - lo)));
          const u1 = Math.min(1, Math.max(0, (hi - prof[j + 1]!) / (hi - lo)));
          dark += (u0 + u1) * 0.5 * step;
        }
        const d = -reach + jA * step + dark;
        pts.push([px + out[0] * d, py + out[1] * d]);
        fs.push(f);
      }
      const robust = (sel: [number, number][]) => {
        if (sel.length < 6) return null;
        let L = fitLine(sel);
        // reject outliers (a dust speck on the edge) and refit
        const res = sel.map((p) => Math.abs(L.n[0] * p[0] + L.n[1] * p[1] - L.c));
        const sorted = [...res].sort((x, y) => x - y);
        const mad = sorted[Math.floor(sorted.length / 2)]! * 1.4826 + 0.02;
        const keep = sel.filter((_, i) => res[i]! < 3 * mad);
        if (keep.length >= 6) L = fitLine(keep);
        return L;
      };
      const La = robust(pts.filter((_, i) => fs[i]! < 0.5));
      const Lb = robust(pts.filter((_, i) => fs[i]! >= 0.5));
      if (!La || !Lb) return null;
      halves.push({ a: La, b: Lb });
      rr += (La.rms * La.rms + Lb.rms * Lb.rms) / 2;
    }
    const nq: [number, number][] = [];
    for (let i = 0; i < 4; i++) {
      const A = halves[(i + 3) % 4]!.b;
      const B = halves[i]!.a;
      const det = A.n[0] * B.n[1] - A.n[1] * B.n[0];
      if (Math.abs(det) < 1e-9) return null;
      nq.push([(A.c * B.n[1] - A.n[1] * B.c) / det, (A.n[0] * B.c - A.c * B.n[0]) / det]);
    }
    q = nq as Corners;
    rms = Math.sqrt(rr / 4);
  }
  return { corners: q, rms };
}

/** Orders corners so that the shoelace area is negative and corner 0 is `first`. */
function orderCorners(c: [number, number][], first: (c: [number, number][]) => number): Corners {
  let p = [...c];
  if (shoelace(p) > 0) p = [p[0]!, p[3]!, p[2]!, p[1]!];
  const k = first(p);
  return [p[k % 4]!, p[(k + 1) % 4]!, p[(k + 2) % 4]!, p[(k + 3) % 4]!] as Corners;
}

/** Mean grey over a small square of the target frame (fractions of the size), through the corner homography. */
function meanInTarget(grey: Float32Array, w: number, h: number, c: Corners, cx: number, cy: number, half: number): number {
  const H = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], c);
  let s = 0;
  let n = 0;
  for (let i = -2; i <= 2; i++)
    for (let j = -2; j <= 2; j++) {
      const [u, v] = applyH(H, cx + (i / 2) * half, cy + (j / 2) * half);
      s += sampleGrey(grey, w, h, u, v);
      n++;
    }
  return s / n;
}

/**
 * Finds the reference square. `small` is the grey image reduced by `factor` (8 bit); `grey` the full image.
 * Returns null when no square is found.
 */
export async function findSquare(grey: Float32Array, w: number, h: number, small: { data: Uint8Array; width: number; height: number }, factor: number): Promise<SquareFound | null> {
  const { cv } = await getCv();
  const src = matFromGrey(cv, small.data, small.width, small.height);
  const bin = new cv.Mat() as CvMat;
  const contours = new cv.MatVector() as { size(): number; get(i: number): CvMat; delete(): void };
  const hier = new cv.Mat() as CvMat;
  const quads: Quad[] = [];
  try {
    const block = (Math.max(15, Math.round(Math.min(small.width, small.height) / 12)) | 1) >>> 0;
    cv.adaptiveThreshold(src, bin, 255, cv.ADAPTIVE_THRESH_MEAN_C, cv.THRESH_BINARY_INV, block, 12);
    cv.findContours(bin, contours, hier, cv.RETR_CCOMP, cv.CHAIN_APPROX_SIMPLE);
    const minArea = (Math.min(small.width, small.height) * 0.03) ** 2;
    const n = contours.size();
    const hd = hier.data32S;
    for (let i = 0; i < n; i++) {
      const c = contours.get(i);
      try {
        const area = Math.abs(cv.contourArea(c) as number);
        if (area < minArea) continue;
        const peri = cv.arcLength(c, true) as number;
        const approx = new cv.Mat() as CvMat;
        cv.approxPolyDP(c, approx, 0.03 * peri, true);
        if (approx.rows === 4 && cv.isContourConvex(approx)) {
          const d = approx.data32S;
          const pts: [number, number][] = [0, 1, 2, 3].map((k) => [d[2 * k]! * factor + (factor - 1) / 2, d[2 * k + 1]! * factor + (factor - 1) / 2]);
          if (squareLike(pts)) quads.push({ pts, area: area * factor * factor, hole: hd[4 * i + 3]! >= 0, parent: hd[4 * i + 3]!, index: i });
        }
        approx.delete();
      } finally {
        c.delete();
      }
    }
  } finally {
    src.delete();
    bin.delete();
    contours.delete();
    hier.delete();
  }
  // Gridproof target: an outer quad whose hole is a quad of the frame's inner area ratio
  const innerRatio = (1 - 2 * FRAME_FRACTION) ** 2;
  type Cand = { outer: Quad; score: number; kind: 'target' | 'square' };
  const cands: Cand[] = [];
  for (const o of quads) {
    if (o.hole) continue;
    const inner = quads.find((q) => q.hole && q.parent === o.index && Math.abs(q.area / o.area - innerRatio) < 0.15);
    if (inner) cands.push({ outer: o, score: 10 + Math.log(o.area), kind: 'target' });
    else cands.push({ outer: o, score: Math.log(o.area), kind: 'square' });
  }
  cands.sort((a, b) => b.score - a.score);
  for (const cand of cands) {
    const start = orderCorners(cand.outer.pts, () => 0);
    const side = Math.sqrt(cand.outer.area);
    const reach = Math.max(3, Math.min(2.5 * factor + 3, cand.kind === 'target' ? 0.45 * FRAME_FRACTION * side : 0.2 * side));
    const ref = refineCorners(grey, w, h, start, reach);
    if (!ref) continue;
    // contrast check: dark inside the edge, lighter outside
    const c = ref.corners;
    const inside = cand.kind === 'target' ? meanInTarget(grey, w, h, c, FRAME_FRACTION / 2, 0.5, 0.02) : meanInTarget(grey, w, h, c, 0.5, 0.5, 0.1);
    const outsideVals = [
      meanInTarget(grey, w, h, c, -0.04, 0.5, 0.01),
      meanInTarget(grey, w, h, c, 1.04, 0.5, 0.01),
      meanInTarget(grey, w, h, c, 0.5, -0.04, 0.01),
      meanInTarget(grey, w, h, c, 0.5, 1.04, 0.01),
    ];
    if (Math.min(...outsideVals) - inside < 25) continue;
    let markFound = false;
    let corners: Corners;
    if (cand.kind === 'target') {
      const white = meanInTarget(grey, w, h, c, 0.5, 0.5, 0.1);
      const m = MARK_CENTRE_FRACTION;
      const spots = [[m, m], [1 - m, m], [1 - m, 1 - m], [m, 1 - m]].map(([x, y]) => meanInTarget(grey, w, h, c, x!, y!, MARK_FRACTION * 0.3));
      const k = spots.indexOf(Math.min(...spots));
      const others = spots.filter((_, i) => i !== k);
      markFound = spots[k]! < (white + inside) / 2 && Math.min(...others) > (white + inside) / 2;
      // the mark is at target-frame (m, m) of corner 0: in the unit frame of `c`, corner k is at spot k
      corners = markFound ? orderCorners(c, () => k) : orderCorners(c, (p) => bottomLeft(p));
    } else corners = orderCorners(c, (p) => bottomLeft(p));
    return { corners, kind: cand.kind, markFound, edgeRmsPx: ref.rms };
  }
  return null;
}

function bottomLeft(p: [number, number][]): number {
  let k = 0;
  for (let i = 1; i < 4; i++) if (p[i]![1] - p[i]![0] > p[k]![1] - p[k]![0]) k = i;
  return k;
}
