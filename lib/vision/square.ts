/**
 * Finding the reference square: candidate quadrilaterals from a dark-region threshold at reduced resolution
 * (opencv-wasm contours + polygon approximation), the one that is a square seen in perspective, then sub-pixel
 * edge points at full resolution along each side (and along the frame stroke's inner edge), and the corners, their
 * covariance and the camera's edge bias from one joint fit of all of them (edgefit.ts).
 *
 * Frames: image px (origin top-left, +y down; pixel centres at integers). Corners are returned in order 0..3 of
 * the target frame (see target.ts): counter-clockwise seen from above, which is a negative shoelace area in
 * image coordinates; corner 0 is the one by the orientation mark, or for a plain square the one nearest the
 * photo's bottom-left.
 */
import { getCv, type CV, type CvMat } from './cv';
import { forEachContour, withContourMats } from './contours';
import { applyH, homographyFrom4 } from '@/lib/geometry/homography';
import { DEFAULT_BIAS_PRIOR, fitSquareEdges, type SquareEdgeFit } from './edgefit';
import { FRAME_FRACTION, MARK_CENTRE_FRACTION, MARK_FRACTION } from './target';

export type Corners = [[number, number], [number, number], [number, number], [number, number]];

export interface SquareFound {
  corners: Corners;
  kind: 'target' | 'square';
  /** Whether the orientation mark was seen (then corner 0 is the mark's corner). */
  markFound: boolean;
  /** RMS distance of the edge points from their fitted side lines, px. */
  edgeRmsPx: number;
  /**
   * What the corners were measured from: the frame stroke's centreline (outer and inner edges, free of the
   * camera's edge bias) or the outer edges only (a plain square, or a frame whose inner edge was not found).
   */
  reference: 'centreline' | 'outer-edge';
  /**
   * Edge bias measured on the stroke (edgefit.ts), px (positive: the black reads wider than printed): the mean over
   * the four sides and their spread; absent for outer edges only.
   */
  edgeBiasPx?: number;
  edgeBiasSdPx?: number;
  /** 1σ of the bias used, px: of the measured mean, or of the assumed one for outer edges only. */
  edgeBiasSigmaPx?: number;
  /** 1σ of each corner per image axis (RMS over the eight coordinates), px, from the fitted edges' residuals. */
  cornerSigmaPx: number;
  /** Covariance of the corners (x0, y0, x1, y1, … in the order of `corners`), px², row-major 8 × 8. */
  cornerCovPx2?: number[];
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

/** Bilinear sample of a float grey plane (image px, clamped at the border), each neighbour first mapped by `decode`. */
function bilinear(g: Float32Array, w: number, h: number, x: number, y: number, decode: (v: number) => number): number {
  const xf = x < 0 ? 0 : x > w - 1.001 ? w - 1.001 : x;
  const yf = y < 0 ? 0 : y > h - 1.001 ? h - 1.001 : y;
  const x0 = Math.floor(xf);
  const y0 = Math.floor(yf);
  const fx = xf - x0;
  const fy = yf - y0;
  const i = y0 * w + x0;
  const a = decode(g[i]!);
  const b = decode(g[i + 1]!);
  const c = decode(g[i + w]!);
  const d = decode(g[i + w + 1]!);
  return a + (b - a) * fx + (c - a) * fy + (a - b - c + d) * fx * fy;
}

const asStored = (v: number) => v;

/** Bilinear sample of a float grey plane (image px, clamped at the border), in the plane's own values. */
export function sampleGrey(g: Float32Array, w: number, h: number, x: number, y: number): number {
  return bilinear(g, w, h, x, y, asStored);
}

/** sRGB-encoded grey (0–255) → linear light (0–1): edges are located where the optics blurred them, in linear light. */
const LINEAR = new Float64Array(1025).map((_, i) => {
  const c = i / 1024;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
});
export function toLinear(v: number): number {
  const x = (v < 0 ? 0 : v > 255 ? 255 : v) * (1024 / 255);
  const i = Math.min(1023, Math.floor(x));
  return LINEAR[i]! + (LINEAR[i + 1]! - LINEAR[i]!) * (x - i);
}

/** Bilinear sample in linear light (each neighbour decoded before interpolating). */
function sampleLinear(g: Float32Array, w: number, h: number, x: number, y: number): number {
  return bilinear(g, w, h, x, y, toLinear);
}

/** A fitted edge line n·p = c (unit normal n, px) with what its precision needs. */
interface EdgeLine {
  n: [number, number];
  c: number;
  /** RMS distance of the points from the line, px. */
  rms: number;
  /** Number of points, their centroid and spread along the line (Σ t², px²), for the offset's variance. */
  m: number;
  mean: [number, number];
  stt: number;
}

/** Total-least-squares line through points: unit normal n and offset c with n·p = c. */
function fitLine(pts: [number, number][]): EdgeLine {
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
  let stt = 0;
  for (const p of pts) {
    r += (n[0] * p[0] + n[1] * p[1] - c) ** 2;
    stt += (-n[1] * (p[0] - mx) + n[0] * (p[1] - my)) ** 2;
  }
  return { n, c, rms: Math.sqrt(r / Math.max(1, m - 2)), m, mean: [mx, my], stt };
}

/** Intersection of two lines n·p = c; null when they are parallel. */
function meet(A: { n: [number, number]; c: number }, B: { n: [number, number]; c: number }): [number, number] | null {
  const det = A.n[0] * B.n[1] - A.n[1] * B.n[0];
  if (Math.abs(det) < 1e-9) return null;
  return [(A.c * B.n[1] - A.n[1] * B.c) / det, (A.n[0] * B.c - A.c * B.n[0]) / det];
}

/** Per side of a quad, the lines through its first half (from corner s) and its second half (to corner s + 1). */
export type SideLines = { a: EdgeLine; b: EdgeLine }[];

/** Spacing of the samples across a side, px. */
const PROFILE_STEP_PX = 0.25;

/**
 * Where a profile across an edge (linear light, sampled every `step` px from −`reach` px, rising from dark to light)
 * has its edge, px from the profile's centre; null when it has no clear step. Found by area, not by a level
 * crossing: around the steepest rise, the dark length from the window's start equals the integral of the
 * normalised darkness (exact for a blurred or pixel-averaged step, whatever its sub-pixel phase).
 */
function edgeInProfile(prof: Float64Array, reach: number, step: number): number | null {
  const nProf = prof.length;
  let best = -1;
  let bestG = 0;
  for (let j = 2; j < nProf - 2; j++) {
    const g = prof[j + 2]! + prof[j + 1]! - prof[j - 1]! - prof[j - 2]!;
    if (g > bestG) {
      bestG = g;
      best = j;
    }
  }
  if (best < 3 || best > nProf - 4) return null;
  // the dark and the light plateau around the step
  let lo = Infinity;
  let hi = -Infinity;
  for (let j = Math.max(0, best - 12); j <= best; j++) lo = Math.min(lo, prof[j]!);
  for (let j = best; j <= Math.min(nProf - 1, best + 12); j++) hi = Math.max(hi, prof[j]!);
  if (hi - lo < 1e-3) return null;
  const jA = Math.max(0, best - 12);
  const jB = Math.min(nProf - 1, best + 12);
  let dark = 0;
  for (let j = jA; j < jB; j++) {
    const u0 = Math.min(1, Math.max(0, (hi - prof[j]!) / (hi - lo)));
    const u1 = Math.min(1, Math.max(0, (hi - prof[j + 1]!) / (hi - lo)));
    dark += (u0 + u1) * 0.5 * step;
  }
  return -reach + jA * step + dark;
}

/**
 * Edge points (image px) along side a → b (px): at 12–200 stations from 6 % to 94 % of the side, the edge on a
 * linear-light profile along `out` (unit, px; dark → light) within ±`reach` px; with each point's station (fraction
 * of the side).
 */
function edgePointsAlongSide(grey: Float32Array, w: number, h: number, a: readonly [number, number], b: readonly [number, number], out: readonly [number, number], reach: number): { pts: [number, number][]; fs: number[] } {
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  const pts: [number, number][] = [];
  const fs: number[] = [];
  const nSamples = Math.max(12, Math.min(200, Math.floor(len / 2)));
  const step = PROFILE_STEP_PX;
  const prof = new Float64Array(Math.floor((2 * reach) / step) + 1);
  for (let k = 0; k < nSamples; k++) {
    const f = 0.06 + (0.88 * k) / (nSamples - 1);
    const px = a[0] + (b[0] - a[0]) * f;
    const py = a[1] + (b[1] - a[1]) * f;
    for (let j = 0; j < prof.length; j++) {
      const d = -reach + j * step;
      prof[j] = sampleLinear(grey, w, h, px + out[0] * d, py + out[1] * d);
    }
    const d = edgeInProfile(prof, reach, step);
    if (d === null) continue;
    pts.push([px + out[0] * d, py + out[1] * d]);
    fs.push(f);
  }
  return { pts, fs };
}

/** Line through edge points (px) with outliers beyond 3 MAD (a dust speck on the edge) rejected and refitted; null under 6 points. */
function robustEdgeLine(sel: [number, number][]): { L: EdgeLine; keep: [number, number][] } | null {
  if (sel.length < 6) return null;
  let L = fitLine(sel);
  const res = sel.map((p) => Math.abs(L.n[0] * p[0] + L.n[1] * p[1] - L.c));
  const sorted = [...res].sort((x, y) => x - y);
  const mad = sorted[Math.floor(sorted.length / 2)]! * 1.4826 + 0.02;
  const keep = sel.filter((_, i) => res[i]! < 3 * mad);
  if (keep.length >= 6) L = fitLine(keep);
  return { L, keep: keep.length >= 6 ? keep : sel };
}

/** One side of a quad measured: lines through its two halves, the inlying edge points (px) and the side's frame. */
interface MeasuredSide {
  lines: { a: EdgeLine; b: EdgeLine };
  kept: [number, number][];
  frame: SideFrame;
}

/**
 * Measures side s (corner s → s + 1) of quad `q` (px). `negativeArea`: the quad's shoelace area is negative (then
 * the outward normal is left of the tangent); `darkInside` as for refineCorners. Null when a half has too few points.
 */
function measureSide(grey: Float32Array, w: number, h: number, q: Corners, s: number, negativeArea: boolean, darkInside: boolean, reach: number): MeasuredSide | null {
  const a = q[s]!;
  const b = q[(s + 1) % 4]!;
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  const t: [number, number] = [(b[0] - a[0]) / len, (b[1] - a[1]) / len];
  // the profile runs from dark to light, so inward for a light quad in a dark frame
  const o: [number, number] = negativeArea ? [-t[1], t[0]] : [t[1], -t[0]];
  const out: [number, number] = darkInside ? o : [-o[0], -o[1]];
  const { pts, fs } = edgePointsAlongSide(grey, w, h, a, b, out, reach);
  const Ra = robustEdgeLine(pts.filter((_, i) => fs[i]! < 0.5));
  const Rb = robustEdgeLine(pts.filter((_, i) => fs[i]! >= 0.5));
  if (!Ra || !Rb) return null;
  return { lines: { a: Ra.L, b: Rb.L }, kept: [...Ra.keep, ...Rb.keep], frame: { a, t, o } };
}

/** A quad refined on the full image (px): corners, edge RMS (px), the half-side lines, side curves, edge points and side frames. */
export interface RefinedQuad {
  corners: Corners;
  rms: number;
  sides: SideLines;
  curves: SideCurve[];
  points: [number, number][][];
  frames: SideFrame[];
}

/**
 * Refines a quadrilateral's corners on the full-resolution grey image: along each side, edge points where the
 * intensity profile across the side steps from dark to light (located by the area under the normalised darkness),
 * a robust line fit per half side and the corners where neighbouring half lines meet (twice, the second pass within
 * half the reach); the final corners where the sides' quadratic curves through all inliers meet (a lens bends a
 * straight side into nearly a parabola). `reachPx` bounds the search across a side. `darkInside` (default true):
 * the quad is dark and its surround light (a square's outer edge); false for the inner edge of a frame (light
 * inside, dark stroke outside). Image px throughout.
 */
export function refineCorners(grey: Float32Array, w: number, h: number, quad: Corners, reachPx: number, darkInside = true): RefinedQuad | null {
  let q = quad;
  let rms = 0;
  const negativeArea = shoelace(q) < 0;
  let sides: MeasuredSide[] = [];
  for (let iter = 0; iter < 2; iter++) {
    const reach = iter === 0 ? reachPx : Math.max(3, reachPx / 2);
    sides = [];
    let rr = 0;
    for (let s = 0; s < 4; s++) {
      const side = measureSide(grey, w, h, q, s, negativeArea, darkInside, reach);
      if (!side) return null;
      sides.push(side);
      rr += (side.lines.a.rms * side.lines.a.rms + side.lines.b.rms * side.lines.b.rms) / 2;
    }
    const nq = quadOf(sides.map((s) => s.lines));
    if (!nq) return null;
    q = nq;
    rms = Math.sqrt(rr / 4);
  }
  const curves: SideCurve[] = [];
  for (const s of sides) {
    const C = fitCurve(s.kept, s.frame);
    if (!C) return null;
    curves.push(C);
  }
  const cq = curveQuad(curves, q);
  if (!cq) return null;
  return { corners: cq, rms, sides: sides.map((s) => s.lines), curves, points: sides.map((s) => s.kept), frames: sides.map((s) => s.frame) };
}

/** Corners where the half-lines next to each corner meet: corner i from side i − 1's second half and side i's first. */
function quadOf(sides: { a: { n: [number, number]; c: number }; b: { n: [number, number]; c: number } }[]): Corners | null {
  const nq: [number, number][] = [];
  for (let i = 0; i < 4; i++) {
    const p = meet(sides[(i + 3) % 4]!.b, sides[i]!.a);
    if (!p) return null;
    nq.push(p);
  }
  return nq as Corners;
}

/** A side's frame: its start corner, unit tangent along it and unit outward normal, px. */
export interface SideFrame {
  a: [number, number];
  t: [number, number];
  o: [number, number];
}

/**
 * A side as a quadratic curve in its frame: offset along the outward normal e(τ) = c0 + c1 τ + c2 τ², with τ the
 * distance along the tangent in units of `scale` px; `cov` the coefficients' covariance (px², σ² (AᵀA)⁻¹ of the
 * least-squares fit), rms the residual.
 */
export interface SideCurve {
  f: SideFrame;
  scale: number;
  c: [number, number, number];
  cov: number[];
  rms: number;
}

/** Solves a 3 × 3 symmetric system by Cramer's rule; returns the inverse as well. */
function inv3(m: number[]): number[] | null {
  const [a, b, c, d, e, f, g, h, i] = m as [number, number, number, number, number, number, number, number, number];
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (Math.abs(det) < 1e-18) return null;
  return [A, -(b * i - c * h), b * f - c * e, B, a * i - c * g, -(a * f - c * d), C, -(a * h - b * g), a * e - b * d].map((x) => x / det);
}

/** Robust quadratic fit of edge points in a side's frame (two passes, 3 MAD rejection). */
function fitCurve(pts: [number, number][], f: SideFrame, scale = 0): SideCurve | null {
  const tau: number[] = [];
  const e: number[] = [];
  let tmax = 1;
  for (const p of pts) {
    const dx = p[0] - f.a[0];
    const dy = p[1] - f.a[1];
    tau.push(dx * f.t[0] + dy * f.t[1]);
    e.push(dx * f.o[0] + dy * f.o[1]);
    tmax = Math.max(tmax, Math.abs(tau[tau.length - 1]!));
  }
  const sc = scale || tmax;
  let use = tau.map(() => true);
  let out: SideCurve | null = null;
  for (let pass = 0; pass < 2; pass++) {
    const M = new Array<number>(9).fill(0);
    const r = [0, 0, 0];
    let m = 0;
    for (let k = 0; k < tau.length; k++) {
      if (!use[k]) continue;
      const u = tau[k]! / sc;
      const g = [1, u, u * u];
      for (let i = 0; i < 3; i++) {
        r[i]! += g[i]! * e[k]!;
        for (let j = 0; j < 3; j++) M[i * 3 + j]! += g[i]! * g[j]!;
      }
      m++;
    }
    if (m < 8) return out;
    const Mi = inv3(M);
    if (!Mi) return out;
    const c: [number, number, number] = [0, 1, 2].map((i) => Mi[i * 3]! * r[0]! + Mi[i * 3 + 1]! * r[1]! + Mi[i * 3 + 2]! * r[2]!) as [number, number, number];
    const res = tau.map((t, k) => e[k]! - (c[0] + (c[1] * t) / sc + (c[2] * t * t) / (sc * sc)));
    let ss = 0;
    for (let k = 0; k < res.length; k++) if (use[k]) ss += res[k]! ** 2;
    const rms = Math.sqrt(ss / Math.max(1, m - 3));
    out = { f, scale: sc, c, cov: Mi.map((x) => x * rms * rms), rms };
    const sorted = res.filter((_, k) => use[k]).map(Math.abs).sort((x, y) => x - y);
    const mad = sorted[Math.floor(sorted.length / 2)]! * 1.4826 + 0.02;
    use = res.map((v) => Math.abs(v) < 3 * mad);
  }
  return out;
}

/** Point of a side curve at τ (px along the tangent) and its tangent direction. */
function curveAt(C: SideCurve, tau: number): { p: [number, number]; d: [number, number] } {
  const u = tau / C.scale;
  const e = C.c[0] + C.c[1] * u + C.c[2] * u * u;
  const de = (C.c[1] + 2 * C.c[2] * u) / C.scale;
  const { a, t, o } = C.f;
  return { p: [a[0] + tau * t[0] + e * o[0], a[1] + tau * t[1] + e * o[1]], d: [t[0] + de * o[0], t[1] + de * o[1]] };
}

/** τ of the point of a curve's frame nearest p (its projection on the tangent). */
function tauOf(C: SideCurve, p: readonly [number, number]): number {
  return (p[0] - C.f.a[0]) * C.f.t[0] + (p[1] - C.f.a[1]) * C.f.t[1];
}

/** Variance of a curve's offset at τ, px². */
function curveVar(C: SideCurve, tau: number): number {
  const u = tau / C.scale;
  const g = [1, u, u * u];
  let v = 0;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) v += g[i]! * C.cov[i * 3 + j]! * g[j]!;
  return Math.max(0, v);
}

/** Where two side curves meet, from a starting guess (Newton on P₁(τ₁) = P₂(τ₂)). */
function meetCurves(C1: SideCurve, C2: SideCurve, guess: readonly [number, number]): [number, number] | null {
  let t1 = tauOf(C1, guess);
  let t2 = tauOf(C2, guess);
  for (let it = 0; it < 8; it++) {
    const A = curveAt(C1, t1);
    const B = curveAt(C2, t2);
    const fx = A.p[0] - B.p[0];
    const fy = A.p[1] - B.p[1];
    // [d1, −d2] [Δ1, Δ2]ᵀ = −F
    const det = A.d[0] * -B.d[1] - -B.d[0] * A.d[1];
    if (Math.abs(det) < 1e-9) return null;
    const d1 = (-fx * -B.d[1] - -B.d[0] * -fy) / det;
    const d2 = (A.d[0] * -fy - -fx * A.d[1]) / det;
    t1 += d1;
    t2 += d2;
    if (Math.abs(d1) + Math.abs(d2) < 1e-7) break;
  }
  return curveAt(C1, t1).p;
}

/** Corners where neighbouring side curves meet (corner i: side i − 1 and side i). */
function curveQuad(curves: SideCurve[], guess: Corners): Corners | null {
  const q: [number, number][] = [];
  for (let i = 0; i < 4; i++) {
    const p = meetCurves(curves[(i + 3) % 4]!, curves[i]!, guess[i]!);
    if (!p) return null;
    q.push(p);
  }
  return q as Corners;
}

/** 1σ per image axis of the corners where the side curves meet (RMS over the four), px. */
function cornerSigmaOf(curves: SideCurve[], q: Corners): number {
  let v = 0;
  for (let i = 0; i < 4; i++) {
    const A = curves[(i + 3) % 4]!;
    const B = curves[i]!;
    v += (curveVar(A, tauOf(A, q[i]!)) + curveVar(B, tauOf(B, q[i]!))) / 2;
  }
  return Math.sqrt(v / 4);
}

/** Orders corners so that the shoelace area is negative and corner 0 is `first`. */
function orderCorners(c: [number, number][], first: (c: [number, number][]) => number): Corners {
  return orderIndex(c, first).map((i) => c[i]!) as Corners;
}

/** The order of `orderCorners` as indices into c. */
function orderIndex(c: readonly [number, number][], first: (c: [number, number][]) => number): number[] {
  let idx = [0, 1, 2, 3];
  if (shoelace(c) > 0) idx = [0, 3, 2, 1];
  const k = first(idx.map((i) => c[i]!));
  return [0, 1, 2, 3].map((j) => idx[(k + j) % 4]!);
}

const sd = (v: readonly number[]) => {
  const m = v.reduce((a, b) => a + b, 0) / v.length;
  return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / Math.max(1, v.length - 1));
};

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

/** Grey-level difference (0–255) that tells ink from paper in the square's checks. */
const INK_CONTRAST = 25;

/** The reduced image the candidate search runs on: 8-bit grey, its size in reduced px. */
interface ReducedImage {
  data: Uint8Array;
  width: number;
  height: number;
}

/**
 * Convex four-vertex contours of a dark-region adaptive threshold on the reduced image that can be a square in
 * perspective, their corners in full-image px (a reduced pixel's centre at factor·i + (factor − 1)/2), areas in
 * full-image px², and which are holes in which outer contour (RETR_CCOMP).
 */
function candidateQuads(cv: CV, small: ReducedImage, factor: number): Quad[] {
  const quads: Quad[] = [];
  withContourMats(cv, small.data, small.width, small.height, ({ src, bin, contours, hier }) => {
    const block = (Math.max(15, Math.round(Math.min(small.width, small.height) / 12)) | 1) >>> 0;
    cv.adaptiveThreshold(src, bin, 255, cv.ADAPTIVE_THRESH_MEAN_C, cv.THRESH_BINARY_INV, block, 12);
    cv.findContours(bin, contours, hier, cv.RETR_CCOMP, cv.CHAIN_APPROX_SIMPLE);
    const minArea = (Math.min(small.width, small.height) * 0.03) ** 2;
    const hd = hier.data32S;
    forEachContour(contours, (c, i) => {
      const area = Math.abs(cv.contourArea(c) as number);
      if (area < minArea) return;
      const peri = cv.arcLength(c, true) as number;
      const approx = new cv.Mat() as CvMat;
      cv.approxPolyDP(c, approx, 0.03 * peri, true);
      if (approx.rows === 4 && cv.isContourConvex(approx)) {
        const d = approx.data32S;
        const pts: [number, number][] = [0, 1, 2, 3].map((k) => [d[2 * k]! * factor + (factor - 1) / 2, d[2 * k + 1]! * factor + (factor - 1) / 2]);
        if (squareLike(pts)) quads.push({ pts, area: area * factor * factor, hole: hd[4 * i + 3]! >= 0, parent: hd[4 * i + 3]!, index: i });
      }
      approx.delete();
    });
  });
  return quads;
}

/** An outer quad to try, and what it looks like: Gridproof's target or a plain square. */
interface Candidate {
  outer: Quad;
  score: number;
  kind: 'target' | 'square';
}

/**
 * Outer quads, best first: Gridproof's target (an outer quad whose hole is a quad of the frame's inner area ratio,
 * (1 − 2 FRAME_FRACTION)² ± 0.15) before any plain square, larger before smaller.
 */
function rankCandidates(quads: readonly Quad[]): Candidate[] {
  const innerRatio = (1 - 2 * FRAME_FRACTION) ** 2;
  const cands: Candidate[] = [];
  for (const o of quads) {
    if (o.hole) continue;
    const inner = quads.find((q) => q.hole && q.parent === o.index && Math.abs(q.area / o.area - innerRatio) < 0.15);
    if (inner) cands.push({ outer: o, score: 10 + Math.log(o.area), kind: 'target' });
    else cands.push({ outer: o, score: Math.log(o.area), kind: 'square' });
  }
  return cands.sort((a, b) => b.score - a.score);
}

/**
 * Every edge point against one model of the square (edgefit.ts): a frame's outer and inner edges together (corners
 * free of the camera's edge bias, which is measured; the inner edge searched from where the outer corners put it),
 * else the outer edges with the bias unknown (its 1σ in the corners' covariance). `framed`: the first succeeded.
 */
function jointEdgeFit(grey: Float32Array, w: number, h: number, outer: RefinedQuad, kind: 'target' | 'square', reach: number): { fit: SquareEdgeFit | null; framed: boolean } {
  const c = outer.corners;
  if (kind === 'target') {
    const U = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], c);
    const f = FRAME_FRACTION;
    const guess = ([[f, f], [1 - f, f], [1 - f, 1 - f], [f, 1 - f]] as const).map(([x, y]) => applyH(U, x, y)) as Corners;
    const inner = refineCorners(grey, w, h, guess, reach, false);
    const fit = inner ? fitSquareEdges({ outer: outer.points, inner: inner.points, frameFraction: f }, c, { width: w, height: h }) : null;
    if (fit) return { fit, framed: true };
  }
  return { fit: fitSquareEdges({ outer: outer.points }, c, { width: w, height: h }), framed: false };
}

/** What the corners were measured from and how precisely (px, px²), from the joint fit or, failing it, from the side curves. */
function cornerPrecision(fit: SquareEdgeFit | null, framed: boolean, curves: SideCurve[], c: Corners) {
  if (!fit) return { reference: 'outer-edge' as const, cornerSigmaPx: Math.hypot(cornerSigmaOf(curves, c), DEFAULT_BIAS_PRIOR.sigmaPx) };
  if (framed) return { reference: 'centreline' as const, edgeBiasPx: fit.biasMeanPx, edgeBiasSdPx: sd(fit.biasPx), edgeBiasSigmaPx: fit.biasSigmaPx, cornerSigmaPx: fit.cornerSigmaPx, cornerCovPx2: fit.cornerCovPx2 };
  return { reference: 'outer-edge' as const, edgeBiasSigmaPx: fit.biasSigmaPx, cornerSigmaPx: fit.cornerSigmaPx, cornerCovPx2: fit.cornerCovPx2 };
}

/** The ink's grey level (the stroke of a target, the middle of a plain square) when the paper just outside every side is lighter by INK_CONTRAST; else null. */
function inkLevelIfLightAround(grey: Float32Array, w: number, h: number, c: Corners, kind: 'target' | 'square'): number | null {
  const inside = kind === 'target' ? meanInTarget(grey, w, h, c, FRAME_FRACTION / 2, 0.5, 0.02) : meanInTarget(grey, w, h, c, 0.5, 0.5, 0.1);
  const outsideVals = [
    meanInTarget(grey, w, h, c, -0.04, 0.5, 0.01),
    meanInTarget(grey, w, h, c, 1.04, 0.5, 0.01),
    meanInTarget(grey, w, h, c, 0.5, -0.04, 0.01),
    meanInTarget(grey, w, h, c, 0.5, 1.04, 0.01),
  ];
  return Math.min(...outsideVals) - inside < INK_CONTRAST ? null : inside;
}

/**
 * Target-frame order of the corners `c` (indices into c): from the orientation mark when a target's mark is seen
 * (the one dark spot of the four at (m, m) from each corner, darker than half-way between paper and `ink`), else
 * from the corner nearest the photo's bottom-left.
 */
function cornerOrder(grey: Float32Array, w: number, h: number, c: Corners, kind: 'target' | 'square', ink: number): { order: number[]; markFound: boolean } {
  if (kind !== 'target') return { order: orderIndex(c, (p) => bottomLeft(p)), markFound: false };
  const white = meanInTarget(grey, w, h, c, 0.5, 0.5, 0.1);
  const m = MARK_CENTRE_FRACTION;
  const spots = [[m, m], [1 - m, m], [1 - m, 1 - m], [m, 1 - m]].map(([x, y]) => meanInTarget(grey, w, h, c, x!, y!, MARK_FRACTION * 0.3));
  const k = spots.indexOf(Math.min(...spots));
  const others = spots.filter((_, i) => i !== k);
  const markFound = spots[k]! < (white + ink) / 2 && Math.min(...others) > (white + ink) / 2;
  // the mark is at target-frame (m, m) of corner 0: in the unit frame of `c`, corner k is at spot k
  return { order: markFound ? orderIndex(c, () => k) : orderIndex(c, (p) => bottomLeft(p)), markFound };
}

/** The corners' 8 × 8 covariance (px²) with the corners put in `order`. */
function permuteCovariance(cov: readonly number[], order: readonly number[]): number[] {
  return Array.from({ length: 64 }, (_, k) => {
    const r = k >> 3;
    const q = k & 7;
    return cov[(2 * order[r >> 1]! + (r & 1)) * 8 + 2 * order[q >> 1]! + (q & 1)]!;
  });
}

/**
 * One candidate measured on the full image (px): corners refined on the outer edges, the kind confirmed (a frame is
 * light inside its stroke; a filled square the threshold hollows is a plain square), the joint edge fit, the
 * contrast check and the corners' target-frame order. Null when any step fails.
 */
function measureCandidate(grey: Float32Array, w: number, h: number, cand: Candidate, factor: number): SquareFound | null {
  const start = orderCorners(cand.outer.pts, () => 0);
  const side = Math.sqrt(cand.outer.area);
  const reach = Math.max(3, Math.min(2.5 * factor + 3, cand.kind === 'target' ? 0.45 * FRAME_FRACTION * side : 0.2 * side));
  const ref = refineCorners(grey, w, h, start, reach);
  if (!ref) return null;
  const hollowed = cand.kind === 'target' && meanInTarget(grey, w, h, ref.corners, 0.5, 0.5, 0.1) - meanInTarget(grey, w, h, ref.corners, FRAME_FRACTION / 2, 0.5, 0.02) < INK_CONTRAST;
  const kind = hollowed ? 'square' : cand.kind;
  const { fit, framed } = jointEdgeFit(grey, w, h, ref, kind, reach);
  const c = fit ? (fit.corners as Corners) : ref.corners;
  const measured = cornerPrecision(fit, framed, ref.curves, c);
  const ink = inkLevelIfLightAround(grey, w, h, c, kind);
  if (ink === null) return null;
  const { order, markFound } = cornerOrder(grey, w, h, c, kind, ink);
  const corners = order.map((i) => c[i]!) as Corners;
  const permuted = measured.cornerCovPx2 ? { cornerCovPx2: permuteCovariance(measured.cornerCovPx2, order) } : {};
  return { corners, kind, markFound, edgeRmsPx: ref.rms, ...measured, ...permuted };
}

/**
 * Finds the reference square. `small` is the grey image reduced by `factor` (8 bit); `grey` the full image (px).
 * Candidates best first (candidateQuads, rankCandidates), the first that measures (measureCandidate) wins. Returns
 * null when no square is found.
 */
export async function findSquare(grey: Float32Array, w: number, h: number, small: ReducedImage, factor: number): Promise<SquareFound | null> {
  const { cv } = await getCv();
  for (const cand of rankCandidates(candidateQuads(cv, small, factor))) {
    const found = measureCandidate(grey, w, h, cand, factor);
    if (found) return found;
  }
  return null;
}

function bottomLeft(p: [number, number][]): number {
  let k = 0;
  for (let i = 1; i < 4; i++) if (p[i]![1] - p[i]![0] > p[k]![1] - p[k]![0]) k = i;
  return k;
}
