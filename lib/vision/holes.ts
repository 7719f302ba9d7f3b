/**
 * Finding hole centres. Candidates: dark blobs of the reduced image (opencv-wasm adaptive threshold, external
 * contours, moments), kept when their size, mapped onto the bed plane through the square's homography, fits a
 * family and they are round enough. Each candidate is then refined at full resolution in a small window resampled
 * onto the bed plane (so a hole is a circle in mm, free of perspective), by one of two measured methods:
 * - 'centroid': intensity-weighted centroid with weights ramping from 1 (darker than 35 % of the way from the
 *   hole's level to the surround's) to 0 (past 75 %), inside a disc a few px wider than the hole;
 * - 'edge': sub-pixel edge points where rays from the centre cross the mid level, with a robust circle fit.
 * The centre is mapped back to original image px through the same homography.
 *
 * Frames: image px (origin top-left, +y down, pixel centres at integers); bed plane = the reference square's frame,
 * mm (see target.ts). `H` maps the square frame (mm) to image px.
 */
import { getCv, matFromGrey, type CvMat } from './cv';
import { applyH, invertHomography, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { sampleGrey } from './square';

export type CentreMethod = 'centroid' | 'edge';

/**
 * Largest shift of a dark/light edge by the camera's processing, px per side (blur in linear light, tone curves and
 * unsharp masks move the half-way crossing by about −0.5 to +0.55 px in the rendered pipelines).
 */
export const EDGE_BIAS_PX = 0.6;

export interface FamilySize {
  id: string;
  diameterMm: number;
}

export interface HoleDetection {
  /** Centre in image px. */
  x: number;
  y: number;
  diameterPx: number;
  diameterMm: number;
  /** In [0, 1]. */
  confidence: number;
  family: string;
  /** Centre in the square's frame, mm. */
  planeMm: [number, number];
  /** Hole-to-surround contrast, grey levels (0–255 scale). */
  contrast: number;
  /** Longest run of the rim without edge points on the fitted circle, degrees (a cut rim: sheet, clamp, border). */
  rimGapDeg: number;
}

/** A dark round blob of a family's size whose rim is broken over too long an arc to measure it (seen in part). */
export interface PartialHole {
  x: number;
  y: number;
  diameterPx: number;
  planeMm: [number, number];
}

export interface HoleSearch {
  method?: CentreMethod;
  /** Convex polygon in the square frame (mm) where holes are not sought (the target sheet). */
  exclude?: [number, number][];
  /** Relative size tolerance for a family (default 0.15). */
  sizeTolerance?: number;
  /** Receives the candidates refused because their rim is broken over a long arc (holes seen in part). */
  onPartial?: (p: PartialHole) => void;
}

function insidePoly(poly: [number, number][], x: number, y: number): boolean {
  let inside = false;
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const [xi, yi] = poly[i]!;
    const [xj, yj] = poly[j]!;
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
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

// scratch for the level samples of refineHole (1 + 2·16 inside, 3·32 outside)
const INNER = new Float64Array(33);
const OUTER = new Float64Array(96);

/** Kåsa algebraic circle fit: centre and radius through points (least squares on x² + y² + Dx + Ey + F = 0). */
export function fitCircle(pts: [number, number][]): { cx: number; cy: number; r: number } | null {
  const n = pts.length;
  if (n < 5) return null;
  let mx = 0;
  let my = 0;
  for (const p of pts) {
    mx += p[0];
    my += p[1];
  }
  mx /= n;
  my /= n;
  let suu = 0, suv = 0, svv = 0, suuu = 0, svvv = 0, suvv = 0, svuu = 0;
  for (const p of pts) {
    const u = p[0] - mx;
    const v = p[1] - my;
    suu += u * u;
    suv += u * v;
    svv += v * v;
    suuu += u * u * u;
    svvv += v * v * v;
    suvv += u * v * v;
    svuu += v * u * u;
  }
  const a = 0.5 * (suuu + suvv);
  const b = 0.5 * (svvv + svuu);
  const det = suu * svv - suv * suv;
  if (Math.abs(det) < 1e-12) return null;
  const uc = (a * svv - b * suv) / det;
  const vc = (b * suu - a * suv) / det;
  const r = Math.sqrt(uc * uc + vc * vc + (suu + svv) / n);
  return { cx: uc + mx, cy: vc + my, r };
}

interface Refined {
  cx: number;
  cy: number;
  diameterMm: number;
  contrast: number;
  roundness: number;
  coverage: number;
  rimGapDeg: number;
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

/** Refines one hole on the bed plane. Returns null when it is not a dark round hole. */
export function refineHole(grey: Float32Array, w: number, h: number, H: Mat3, x0: number, y0: number, rMm: number, method: CentreMethod, onBrokenRim?: (cx: number, cy: number, rMm: number) => void): Refined | null {
  const s = homographyScale(H, x0, y0);
  const d = 1 / s; // mm per image px here
  const [h0, h1, h2, h3, h4, h5, h6, h7, h8] = H as [number, number, number, number, number, number, number, number, number];
  const at = (x: number, y: number) => {
    const iw = 1 / (h6 * x + h7 * y + h8);
    return sampleGrey(grey, w, h, (h0 * x + h1 * y + h2) * iw, (h3 * x + h4 * y + h5) * iw);
  };
  let cx = x0;
  let cy = y0;
  let Lin = 0;
  let Lout = 0;
  let r = rMm;
  const levels = () => {
    let n = 0;
    for (const f of [0, 0.25, 0.45]) for (let k = 0; k < (f === 0 ? 1 : 16); k++) INNER[n++] = at(cx + f * r * Math.cos((k * Math.PI) / 8), cy + f * r * Math.sin((k * Math.PI) / 8));
    Lin = medianInPlace(INNER, n);
    n = 0;
    for (const e of [2.5, 3.5, 4.5]) for (let k = 0; k < 32; k++) OUTER[n++] = at(cx + (r + e * d) * Math.cos((k * Math.PI) / 16), cy + (r + e * d) * Math.sin((k * Math.PI) / 16));
    Lout = medianInPlace(OUTER, n);
  };
  // edge points by rays: where the profile first climbs through the mid level near the expected radius
  const rays = (K: number) => {
    const mid = (Lin + Lout) / 2;
    const pts: [number, number][] = [];
    rayOf.length = 0;
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
    return pts;
  };
  const rayOf: number[] = [];
  let fitRes = 0;
  let coverage = 0;
  let rimGapDeg = 0;
  let diameterMm = 2 * r;
  for (let iter = 0; iter < 4; iter++) {
    levels();
    if (Lout - Lin < 10) return null;
    const K = 48;
    let pts = rays(K);
    coverage = pts.length / K;
    if (coverage < 0.6) {
      onBrokenRim?.(cx, cy, r);
      return null;
    }
    let c = fitCircle(pts);
    if (!c) return null;
    let res = pts.map((p) => Math.abs(Math.hypot(p[0] - c!.cx, p[1] - c!.cy) - c!.r));
    const mad = median(res) * 1.4826 + 0.05 * d;
    const keep = pts.filter((_, i) => res[i]! < 3 * mad);
    // a hole partly covered (by the paper sheet, a clamp) shows a straight or broken rim: too many rays disagree
    if (keep.length < 0.8 * K) {
      onBrokenRim?.(c.cx, c.cy, c.r);
      return null;
    }
    const kept = new Array<boolean>(K).fill(false);
    pts.forEach((_, i) => {
      if (res[i]! < 3 * mad) kept[rayOf[i]!] = true;
    });
    rimGapDeg = longestGapDeg(kept);
    coverage = keep.length / K;
    {
      pts = keep;
      c = fitCircle(pts) ?? c;
      res = pts.map((p) => Math.abs(Math.hypot(p[0] - c!.cx, p[1] - c!.cy) - c!.r));
    }
    fitRes = Math.sqrt(res.reduce((a, b) => a + b * b, 0) / res.length);
    if (Math.hypot(c.cx - x0, c.cy - y0) > rMm * 0.8 || c.r < 0.5 * rMm || c.r > 1.6 * rMm) return null;
    let nx = c.cx;
    let ny = c.cy;
    r = c.r;
    diameterMm = 2 * c.r;
    if (method === 'centroid') {
      const lo = Lin + 0.35 * (Lout - Lin);
      const hi = Lin + 0.75 * (Lout - Lin);
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
      nx = cx + sx / sw;
      ny = cy + sy / sw;
      diameterMm = 2 * Math.sqrt((sw * d * d) / Math.PI);
    }
    const moved = Math.hypot(nx - cx, ny - cy);
    cx = nx;
    cy = ny;
    if (moved < 0.005 * d && iter >= 1) break;
  }
  return { cx, cy, diameterMm, contrast: Lout - Lin, roundness: fitRes / r, coverage, rimGapDeg };
}

/**
 * Finds holes. `small` is the grey image reduced by `factor`; H maps the square frame (mm) to full image px.
 */
export async function findHoles(
  grey: Float32Array,
  w: number,
  h: number,
  small: { data: Uint8Array; width: number; height: number },
  factor: number,
  H: Mat3,
  families: FamilySize[],
  search: HoleSearch = {},
): Promise<HoleDetection[]> {
  const method = search.method ?? 'centroid';
  const tol = search.sizeTolerance ?? 0.15;
  const Hi = invertHomography(H);
  const { cv } = await getCv();
  const centre = applyH(Hi, w / 2, h / 2);
  const s0 = homographyScale(H, centre[0], centre[1]);
  const maxD = Math.max(...families.map((f) => f.diameterMm));
  const block = Math.max(11, Math.round((2.6 * maxD * s0) / factor)) | 1;
  // Bright things (the paper sheet, flanges, chips) would raise the local mean and make the surface next to them
  // read as dark: clip the image just above the surface's level (its median) before the adaptive threshold.
  const hist = new Uint32Array(256);
  for (let i = 0; i < small.data.length; i += 7) hist[small.data[i]!]!++;
  let acc = 0;
  let med = 255;
  const half = hist.reduce((a, b) => a + b, 0) / 2;
  for (let v = 0; v < 256; v++) if ((acc += hist[v]!) >= half) {
    med = v;
    break;
  }
  const clip = Math.min(255, Math.round(med * 1.12 + 4));
  const clipped = new Uint8Array(small.data.length);
  for (let i = 0; i < clipped.length; i++) clipped[i] = Math.min(clip, small.data[i]!);
  const src = matFromGrey(cv, clipped, small.width, small.height);
  const bin = new cv.Mat() as CvMat;
  const contours = new cv.MatVector() as { size(): number; get(i: number): CvMat; delete(): void };
  const hier = new cv.Mat() as CvMat;
  const cands: { x: number; y: number; fam: FamilySize }[] = [];
  // candidates bucketed on the bed plane (cells of half the largest diameter) so that "is one near?" looks at 3 × 3 cells;
  // only a candidate of the same family counts: an insert's flange ring taken for a larger family must not hide the
  // bore at its centre (refinement then keeps the one that is a hole)
  const cell = 0.5 * maxD;
  const grid = new Map<number, { x: number; y: number; fam: string }[]>();
  const key = (i: number, j: number) => i * 1_000_003 + j;
  const near = (x: number, y: number, dist: number, fam: string) => {
    const i0 = Math.floor(x / cell);
    const j0 = Math.floor(y / cell);
    for (let i = i0 - 1; i <= i0 + 1; i++)
      for (let j = j0 - 1; j <= j0 + 1; j++) {
        const b = grid.get(key(i, j));
        if (b && b.some((q) => q.fam === fam && Math.hypot(q.x - x, q.y - y) < dist)) return true;
      }
    return false;
  };
  try {
    // Two offsets: a mild one, and a strict one that parts a dark bore from a flange darker than the surface
    // (brass on light plywood); a hole found twice is one detection after refinement.
    for (const offset of [8, Math.max(20, Math.round(0.3 * med))]) {
      cv.adaptiveThreshold(src, bin, 255, cv.ADAPTIVE_THRESH_MEAN_C, cv.THRESH_BINARY_INV, block, offset);
      cv.findContours(bin, contours, hier, cv.RETR_LIST, cv.CHAIN_APPROX_NONE);
      const n = contours.size();
      const minD = Math.min(...families.map((f) => f.diameterMm));
      const minArea = Math.max(4, 0.25 * Math.PI * ((minD * s0 * 0.35) / factor) ** 2);
      for (let i = 0; i < n; i++) {
        const c = contours.get(i);
        try {
          // a closed chain of n pixel steps (each ≤ √2 px) encloses at most n²/(2π) px²: skip the specks unmeasured
          if ((c.rows * c.rows) / (2 * Math.PI) < minArea) continue;
          const m = cv.moments(c, false) as { m00: number; m10: number; m01: number };
          const area = m.m00;
          if (area < minArea) continue;
          const u = (m.m10 / m.m00) * factor + (factor - 1) / 2;
          const v = (m.m01 / m.m00) * factor + (factor - 1) / 2;
          const b = applyH(Hi, u, v);
          if (search.exclude && insidePoly(search.exclude, b[0], b[1])) continue;
          const sl = homographyScale(H, b[0], b[1]) / factor;
          const peri = cv.arcLength(c, true) as number;
          const circ = (4 * Math.PI * area) / (peri * peri);
          if (circ < 0.5) continue;
          // equivalent diameter in mm; a contour's polygon area misses about half a pixel rim
          const dMm = (2 * Math.sqrt(area / Math.PI) + 1) / sl;
          let best: FamilySize | undefined;
          let bestErr = Infinity;
          for (const f of families) {
            const e = Math.abs(dMm / f.diameterMm - 1);
            if (e < bestErr) {
              bestErr = e;
              best = f;
            }
          }
          if (best && bestErr < 0.5 && !near(b[0], b[1], 0.5 * best.diameterMm, best.id)) {
            cands.push({ x: b[0], y: b[1], fam: best });
            const k = key(Math.floor(b[0] / cell), Math.floor(b[1] / cell));
            const bucket = grid.get(k);
            if (bucket) bucket.push({ x: b[0], y: b[1], fam: best.id });
            else grid.set(k, [{ x: b[0], y: b[1], fam: best.id }]);
          }
        } finally {
          c.delete();
        }
      }
    }
  } finally {
    src.delete();
    bin.delete();
    contours.delete();
    hier.delete();
  }
  const out: HoleDetection[] = [];
  for (const c of cands) {
    const r = refineHole(grey, w, h, H, c.x, c.y, c.fam.diameterMm / 2, method, search.onPartial ? (px, py, rr) => {
      const p = applyH(H, px, py);
      search.onPartial!({ x: p[0], y: p[1], diameterPx: 2 * rr * homographyScale(H, px, py), planeMm: [px, py] });
    } : undefined);
    if (!r) continue;
    if (r.roundness > 0.08) {
      // a dark blob of a hole's size and contrast whose rim is out of round: a rim cut straight (sheet, board) or broken
      if (search.onPartial && r.contrast >= 10) {
        const p = applyH(H, r.cx, r.cy);
        search.onPartial({ x: p[0], y: p[1], diameterPx: r.diameterMm * homographyScale(H, r.cx, r.cy), planeMm: [r.cx, r.cy] });
      }
      continue;
    }
    let fam: FamilySize | undefined;
    let err = Infinity;
    for (const f of families) {
      const e = Math.abs(r.diameterMm / f.diameterMm - 1);
      if (e < err) {
        err = e;
        fam = f;
      }
    }
    const s = homographyScale(H, r.cx, r.cy);
    // the camera's tone curve and sharpening move a dark/light edge by up to EDGE_BIAS_PX on each side: a size
    // tolerance of that many px beside the relative one, which matters for holes a few px across
    const allow = fam ? tol + (2 * EDGE_BIAS_PX) / (s * fam.diameterMm) : 0;
    if (!fam || err > allow) continue;
    const p = applyH(H, r.cx, r.cy);
    const conf = Math.min(1, Math.max(0, (r.contrast - 10) / 40)) * Math.max(0, 1 - r.roundness / 0.08) * Math.max(0, 1 - err / (allow * 1.5)) * r.coverage;
    out.push({ x: p[0], y: p[1], diameterPx: r.diameterMm * s, diameterMm: r.diameterMm, confidence: Math.round(conf * 1000) / 1000, family: fam.id, planeMm: [r.cx, r.cy], contrast: r.contrast, rimGapDeg: r.rimGapDeg });
  }
  // one detection per hole: keep the most confident of any that overlap
  out.sort((a, b) => b.confidence - a.confidence);
  const kept: HoleDetection[] = [];
  for (const d of out) {
    if (kept.some((k) => Math.hypot(k.planeMm[0] - d.planeMm[0], k.planeMm[1] - d.planeMm[1]) < 0.5 * Math.min(k.diameterMm, d.diameterMm))) continue;
    kept.push(d);
  }
  return kept;
}
