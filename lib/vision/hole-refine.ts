/**
 * Refining one hole candidate at full resolution, in a small window resampled onto the bed plane (so a hole is a
 * circle in mm, free of perspective): the hole's and the surround's levels, edge points where rays from the centre
 * cross the mid level, a robust circle through them (a rim broken over a long arc is a hole seen in part), then the
 * centre by one of two methods:
 * - 'centroid': intensity-weighted centroid with weights ramping from 1 (darker than 35 % of the way from the
 *   hole's level to the surround's) to 0 (past 75 %), inside a disc a few px wider than the hole;
 * - 'edge': the circle's centre.
 * Repeated from the new centre until it moves by under 0.005 px.
 *
 * Frames: image px (origin top-left, +y down, pixel centres at integers); bed plane = the reference square's frame,
 * mm (see target.ts). `H` maps the square frame (mm) to image px.
 */
import { homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { fitCircle } from './circle-fit';
import { sampleGrey } from './square';

export type CentreMethod = 'centroid' | 'edge';

/** One refined hole, on the bed plane. */
export interface Refined {
  /** Centre, mm. */
  cx: number;
  cy: number;
  diameterMm: number;
  /** Surround less hole, grey levels (0–255 scale). */
  contrast: number;
  /** RMS distance of the rim's points from their circle over its radius. */
  roundness: number;
  /** Share of the rays whose rim point agrees with the circle. */
  coverage: number;
  /** Longest run of the rim without agreeing points, degrees. */
  rimGapDeg: number;
}

/** Grey (0–255) of the photo at a bed-plane point, mm. */
export type PlaneSampler = (x: number, y: number) => number;

export function planeSampler(grey: Float32Array, w: number, h: number, H: Mat3): PlaneSampler {
  const [h0, h1, h2, h3, h4, h5, h6, h7, h8] = H as [number, number, number, number, number, number, number, number, number];
  return (x, y) => {
    const iw = 1 / (h6 * x + h7 * y + h8);
    return sampleGrey(grey, w, h, (h0 * x + h1 * y + h2) * iw, (h3 * x + h4 * y + h5) * iw);
  };
}

function median(a: number[]): number {
  const s = [...a].sort((x, y) => x - y);
  return s[Math.floor(s.length / 2)] ?? 0;
}

/** Median of the first `n` values of a scratch buffer (sorted in place). */
function medianInPlace(a: Float64Array, n: number): number {
  const s = a.subarray(0, n).sort();
  return s[Math.floor(n / 2)] ?? 0;
}

// scratch for the level samples (1 + 2·16 inside, 3·32 outside)
const INNER = new Float64Array(33);
const OUTER = new Float64Array(96);

/** The hole's level (median inside 0.45 r) and the surround's (median 2.5 to 4.5 px outside the rim); d = mm per px. */
function rimLevels(at: PlaneSampler, cx: number, cy: number, r: number, d: number): { lin: number; lout: number } {
  let n = 0;
  for (const f of [0, 0.25, 0.45]) for (let k = 0; k < (f === 0 ? 1 : 16); k++) INNER[n++] = at(cx + f * r * Math.cos((k * Math.PI) / 8), cy + f * r * Math.sin((k * Math.PI) / 8));
  const lin = medianInPlace(INNER, n);
  n = 0;
  for (const e of [2.5, 3.5, 4.5]) for (let k = 0; k < 32; k++) OUTER[n++] = at(cx + (r + e * d) * Math.cos((k * Math.PI) / 16), cy + (r + e * d) * Math.sin((k * Math.PI) / 16));
  return { lin, lout: medianInPlace(OUTER, n) };
}

/** Edge points by K rays: where each profile climbs through `mid` nearest the expected radius r (within 5 px). */
function rimPoints(at: PlaneSampler, cx: number, cy: number, r: number, d: number, mid: number, K: number): { pts: [number, number][]; rayOf: number[] } {
  const pts: [number, number][] = [];
  const rayOf: number[] = [];
  const step = 0.25 * d;
  const rho0 = Math.max(0.3 * r, r - 5 * d);
  const rho1 = r + 5 * d;
  for (let k = 0; k < K; k++) {
    const th = (2 * Math.PI * k) / K;
    const c = Math.cos(th);
    const sn = Math.sin(th);
    let prev = at(cx + rho0 * c, cy + rho0 * sn);
    let best = -1;
    let bestDist = Infinity;
    for (let rho = rho0 + step; rho <= rho1 + 1e-9; rho += step) {
      const v = at(cx + rho * c, cy + rho * sn);
      if (prev < mid && v >= mid) {
        const t = rho - step + (step * (mid - prev)) / (v - prev);
        if (Math.abs(t - r) < bestDist) {
          bestDist = Math.abs(t - r);
          best = t;
        }
      }
      prev = v;
    }
    if (best > 0) {
      pts.push([cx + best * c, cy + best * sn]);
      rayOf.push(k);
    }
  }
  return { pts, rayOf };
}

/** Longest circular run of rays (of K) not in `kept`, degrees. */
function longestGapDeg(kept: boolean[]): number {
  const K = kept.length;
  if (kept.every((k) => !k)) return 360;
  let best = 0;
  let run = 0;
  for (let i = 0; i < 2 * K; i++) {
    if (kept[i % K]) run = 0;
    else best = Math.max(best, ++run);
  }
  return (Math.min(best, K) * 360) / K;
}

type RimFit = { circle: { cx: number; cy: number; r: number }; coverage: number; rimGapDeg: number; fitRes: number };

/**
 * The rim's circle from its points on K rays, points more than 3 robust σ off the first circle dropped: null when
 * no circle fits, `broken` (where it was) when fewer than 80 % of the rays agree — a straight or broken rim, partly
 * covered by the paper sheet or a clamp.
 */
function fitRim(pts: [number, number][], rayOf: number[], K: number, d: number): RimFit | { broken: { cx: number; cy: number; r: number } } | null {
  const c = fitCircle(pts);
  if (!c) return null;
  const res = pts.map((p) => Math.abs(Math.hypot(p[0] - c.cx, p[1] - c.cy) - c.r));
  const mad = median(res) * 1.4826 + 0.05 * d;
  const keep = pts.filter((_, i) => res[i]! < 3 * mad);
  if (keep.length < 0.8 * K) return { broken: c };
  const kept = new Array<boolean>(K).fill(false);
  pts.forEach((_, i) => {
    if (res[i]! < 3 * mad) kept[rayOf[i]!] = true;
  });
  const circle = fitCircle(keep) ?? c;
  const res2 = keep.map((p) => Math.abs(Math.hypot(p[0] - circle.cx, p[1] - circle.cy) - circle.r));
  return { circle, coverage: keep.length / K, rimGapDeg: longestGapDeg(kept), fitRes: Math.sqrt(res2.reduce((a, b) => a + b * b, 0) / res2.length) };
}

/**
 * The ramp-weighted centroid about (cx, cy) within r + 3.5 px (weights 1 below 35 % of the way from `lin` to
 * `lout`, 0 past 75 %), and the diameter of a disc of the summed weight; null when nothing is dark.
 */
function rampCentroid(at: PlaneSampler, cx: number, cy: number, r: number, d: number, lin: number, lout: number): { x: number; y: number; diameterMm: number } | null {
  const lo = lin + 0.35 * (lout - lin);
  const hi = lin + 0.75 * (lout - lin);
  const R = r + 3.5 * d;
  const N = Math.ceil(R / d);
  let sw = 0;
  let sx = 0;
  let sy = 0;
  for (let j = -N; j <= N; j++)
    for (let i = -N; i <= N; i++) {
      const px = i * d;
      const py = j * d;
      if (px * px + py * py > R * R) continue;
      const v = at(cx + px, cy + py);
      const wgt = v <= lo ? 1 : v >= hi ? 0 : (hi - v) / (hi - lo);
      sw += wgt;
      sx += wgt * px;
      sy += wgt * py;
    }
  if (sw <= 0) return null;
  return { x: cx + sx / sw, y: cy + sy / sw, diameterMm: 2 * Math.sqrt((sw * d * d) / Math.PI) };
}

/**
 * Refines the candidate at (x0, y0) on the bed plane (mm), of radius rMm. Returns null when it is not a dark round
 * hole; `onBrokenRim` receives where a rim broken over a long arc was (a hole seen in part).
 */
export function refineHole(grey: Float32Array, w: number, h: number, H: Mat3, x0: number, y0: number, rMm: number, method: CentreMethod, onBrokenRim?: (cx: number, cy: number, rMm: number) => void): Refined | null {
  const d = 1 / homographyScale(H, x0, y0); // mm per image px here
  const at = planeSampler(grey, w, h, H);
  const K = 48;
  let cx = x0;
  let cy = y0;
  let r = rMm;
  let levels = { lin: 0, lout: 0 };
  let fit: RimFit | undefined;
  let diameterMm = 2 * r;
  for (let iter = 0; iter < 4; iter++) {
    levels = rimLevels(at, cx, cy, r, d);
    if (levels.lout - levels.lin < 10) return null;
    const { pts, rayOf } = rimPoints(at, cx, cy, r, d, (levels.lin + levels.lout) / 2, K);
    if (pts.length / K < 0.6) {
      onBrokenRim?.(cx, cy, r);
      return null;
    }
    const f = fitRim(pts, rayOf, K, d);
    if (!f) return null;
    if ('broken' in f) {
      onBrokenRim?.(f.broken.cx, f.broken.cy, f.broken.r);
      return null;
    }
    fit = f;
    const c = f.circle;
    if (Math.hypot(c.cx - x0, c.cy - y0) > rMm * 0.8 || c.r < 0.5 * rMm || c.r > 1.6 * rMm) return null;
    let nx = c.cx;
    let ny = c.cy;
    r = c.r;
    diameterMm = 2 * c.r;
    if (method === 'centroid') {
      const m = rampCentroid(at, cx, cy, r, d, levels.lin, levels.lout);
      if (!m) return null;
      nx = m.x;
      ny = m.y;
      diameterMm = m.diameterMm;
    }
    const moved = Math.hypot(nx - cx, ny - cy);
    cx = nx;
    cy = ny;
    if (moved < 0.005 * d && iter >= 1) break;
  }
  return { cx, cy, diameterMm, contrast: levels.lout - levels.lin, roundness: fit!.fitRes / r, coverage: fit!.coverage, rimGapDeg: fit!.rimGapDeg };
}
