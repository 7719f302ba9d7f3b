/**
 * The photo-quality stage: before any hole is measured, what this photo can judge and what to change.
 *
 * Measured on the reference target (its 8 straight edges: outer and inner sides of the frame) and on a sample of
 * hole candidates (dark blobs of a family's size on the reduced image):
 * - blur as the variance of the line spread along each edge normal n, in linear light: nᵀΣn with
 *   Σ = σ²·I + (L²/12)·d dᵀ (defocus σ, a straight motion of length L along d; a box of length L has variance L²/12);
 *   the holes' darkness second moments minus a disc's (r²/4 through the target's perspective) give the anisotropic
 *   part of Σ, hence L and d (or, with fewer than 5 holes sampled, the orientation mark's less a square's:
 *   mark-spread.ts); the target's edges then give σ;
 * - exposure: shares of clipped samples on the target's white, right at its black edge, on its black, on the bed
 *   around the holes; the white's level;
 * - the target's side and the holes' diameter in px, the camera's tilt from the target's homography (EXIF focal
 *   length or a 27 mm-equivalent phone lens), whether the bed at the target's scale fits in the frame.
 *
 * Predicted accuracy from a stated model, not from a table of scenes:
 * - a hole's centre as the detector takes it (holes.ts: a centroid weighing each px by a ramp from 35 % to 75 % of
 *   the way from the hole's floor to its surround, in linear light): noise σ_n per px (measured on the flat bed just
 *   outside the rim, with its px-to-px correlation) in the ramp's band of 1.06 σ_b moves it by a per-axis variance
 *   σ_n²·(1 + 2ρ₁ + 2ρ₂)·band/(0.16 π ΔL² r) (derivation at the prediction below); a surround or a floor that is
 *   brighter on one side (light falling off, a flange, a bore wall seen at a tilt; measured per sampled hole as the
 *   first harmonic of the ring outside and the plane of the floor) moves the ramp's crossing of a blurred rim, hence
 *   the centre, by 1.39 or 1.14 σ_b times its relative tone difference across the hole; the two add as variances;
 *   a position's 2-D RMS error is √2 times the per-axis σ, in mm through the target's scale;
 * - the target's corners where the sides' fitted quadratic curves meet (square.ts): the square stage states their
 *   1σ per axis from its fits' covariance and its model check (a lens bend the curves miss), which is used when
 *   given; otherwise a curve of n edge points spread over 88 % of the side, read at its end (13.6 % beyond the
 *   samples), has variance 15.2·s²/n (the leverage of a quadratic least-squares fit there: 1 + 3u² + 5/4·(3u² − 1)²
 *   at u = 1/0.88), s the single points' scatter, halved for the stroke's centreline (the mean of two edges);
 * - the scale along each photo axis from four corners at side S px with per-axis 1σ σ_c: σ_c/S (least squares of an
 *   affine on the corners, Σx² = 4·(S/2)²), which is how the report's scale X and Y take it from the square; the
 *   fit's own share (the camera from the holes) is not in it.
 * Frames: image px (origin top-left, +y down); the target frame as in target.ts.
 */
import type { Pattern, PhotoIssueCode, PhotoQuality } from '@/lib/geometry/contract';
import { ISSUE_ADVICE } from './advice';
import { cutTargetMark, type CutTargetMark } from './cut-target';
import { markSpread } from './mark-spread';
import { getCv, matFromGrey, type CvMat } from './cv';
import { applyH, homographyFrom4, invertHomography, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { sampleGrey, toLinear as lin, type Corners } from './square';
import { FRAME_FRACTION, targetCornersMm } from './target';
import { medianLevel } from './load';

/** Default 35 mm-equivalent focal length of a phone's main camera when EXIF does not say (common practice, 24–28 mm). */
export const ASSUMED_FOCAL_35MM = 27;

/**
 * Limits beyond which the photo is called out. Each is where the method measurably degrades, not a score:
 * - blur: a defocus σ above 1.5 px (sharp phone photos measure 0.6–1.2 px including the pixel itself);
 * - motion: a straight smear longer than 6 px;
 * - over-exposure: the target's white clipped on half its samples while it reads less than 16 times its black in
 *   linear light: a print's toner or ink reflects 3–6 % of what the paper does (optical density 1.2–1.5, common
 *   practice, from memory), a ratio of 16–30, so a clipped white with less contrast would have been brighter (a
 *   photo exposed g times too long divides the ratio by g); or, whatever the camera's tone curve did to that ratio
 *   (a phone's darkens the black: 35 where a linear camera gives 23), the clipped white's frame stroke reading
 *   thinner than printed by over 0.45 of its edges' rise (25 % to 75 % of the way from black to white): the white
 *   beyond the sensor's maximum cuts each edge's rise short on its white side, which moves the edge into the
 *   black; measured on our renders, by 0.26 (×1.3) to 0.55–1.1 (×1.9) of the rise, where a tone curve and
 *   sharpening that keep black and white move it by 0.2–0.35 (a phone's, blurred by 1.4 px or at full mid-tone
 *   contrast with strong sharpening), a linear camera's by under 0.1, a camera that blurs encoded values outward
 *   (−0.23); or a quarter of the bed around the holes clipped;
 * - under-exposure: the white paper below 120 of 255, more than 2 stops under a white near clipping (linear 0.19),
 *   where the sensor's noise starts to set the edges' precision;
 * - target under 200 px a side, holes under 10 px across, a tilt over 20° (the far side then shrinks by a
 *   third against the near side on a phone lens), the target or the bed beyond the frame.
 */
export const LIMITS = { defocusSigmaPx: 1.5, motionPx: 6, whiteClipShare: 0.5, printContrast: 16, strokeThinning: 0.45, holesClipShare: 0.25, whiteLevel: 120, targetSidePx: 200, holeDiameterPx: 10, tiltDeg: 20 } as const;

function median(a: number[]): number {
  if (!a.length) return NaN;
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}
/** Robust standard deviation (1.4826 × median absolute deviation). */
function robustSd(a: number[]): number {
  const m = median(a);
  return 1.4826 * median(a.map((v) => Math.abs(v - m)));
}

/** Millimetres per unit of the pattern's dimensions (inches or mm). */
const mmPerUnit = (pattern: Pattern) => (pattern.units === 'in' ? 25.4 : 1);

export interface QualityInput {
  grey: Float32Array;
  width: number;
  height: number;
  small: { data: Uint8Array; width: number; height: number };
  factor: number;
  /** The target's corners (image px, order of target.ts), or null when none was found. */
  corners: Corners | null;
  referenceMm: number;
  pattern: Pattern;
  focalPx?: number;
  /** 1σ of each corner per image axis, px, as the square stage measured it (absent for corners given by hand). */
  cornerSigmaPx?: number;
  /** Whether `corners` are a cut target's orientation mark (cut-target.ts), when the caller has looked already; else looked for here. */
  cutMark?: CutTargetMark | null;
}

interface EdgeStats {
  /** Unit normal in the image, pointing from black to white. */
  n: [number, number];
  /** Line-spread variance along n, px². */
  varPx2: number;
  lengthPx: number;
  /** Scatter of single edge points about the side's smooth line, px. */
  edgeSdPx: number;
  loLin: number;
  hiLin: number;
  whiteClipped: number;
  edgeClipped: number;
  blackClipped: number;
  outer: boolean;
  /** Where the edge lies along n from where the square's corners put it (median over the profiles), px. */
  shiftPx: number;
  /** Distance along n between the edge's 25 % and 75 % levels of its mean rise (linear light), px. */
  riseIqPx: number;
}

const CLIP_HI = 250;
const CLIP_LO = 3;
/** Spacing of the samples along a profile across an edge, px. */
const PROFILE_STEP_PX = 0.25;
/** Profiles taken across each side of the frame. */
const PROFILES_PER_SIDE = 48;
/**
 * The unit square's sides in the order of target.ts (top, right, bottom, left in the target frame): from corner a to
 * corner b, with the outward normal nt; unit frame (the target's side = 1).
 */
const UNIT_SIDES: { a: [number, number]; b: [number, number]; nt: [number, number] }[] = [
  { a: [0, 0], b: [1, 0], nt: [0, -1] },
  { a: [1, 0], b: [1, 1], nt: [1, 0] },
  { a: [1, 1], b: [0, 1], nt: [0, 1] },
  { a: [0, 1], b: [0, 0], nt: [-1, 0] },
];

/** One profile across an edge: where the edge lies, the levels along it and where it was taken. */
interface EdgeProfile {
  /** The edge's position along n from the profile's middle (by area: the dark length from its start), px. */
  d0: number;
  /** Linear light (0–1) and encoded grey (0–255) every PROFILE_STEP_PX from −R to +R along n. */
  prof: Float64Array;
  enc: Float64Array;
  /** Fraction of the way along the side (unit frame). */
  f: number;
  /** Unit normal in the image, from black to white. */
  n: [number, number];
}

/**
 * Grey along the image-px line P + d·n for d from −R to +R px in steps of PROFILE_STEP_PX: linear light and encoded
 * (0–255). Null when any sample falls outside the photo.
 */
function profileAcross(q: QualityInput, P: [number, number], n: [number, number], R: number): { prof: Float64Array; enc: Float64Array } | null {
  const { grey, width: w, height: h } = q;
  const m = Math.floor((2 * R) / PROFILE_STEP_PX) + 1;
  const prof = new Float64Array(m);
  const enc = new Float64Array(m);
  let off = false;
  for (let j = 0; j < m; j++) {
    const d = -R + j * PROFILE_STEP_PX;
    const x = P[0] + n[0] * d;
    const y = P[1] + n[1] * d;
    if (x < 0 || y < 0 || x > w - 1 || y > h - 1) off = true;
    const e = sampleGrey(grey, w, h, x, y);
    enc[j] = e;
    prof[j] = lin(e);
  }
  return off ? null : { prof, enc };
}

/**
 * A profile's black and white levels (linear light, means over its first and last 2 px) and its edge by area: the
 * integral of the normalised darkness (h0 − I)/(h0 − l0) from the profile's start, px. Null below a 0.02 rise.
 */
function edgeByArea(prof: Float64Array): { l0: number; h0: number; darkPx: number } | null {
  const step = PROFILE_STEP_PX;
  const m = prof.length;
  const e2 = Math.round(2 / step);
  let l0 = 0;
  let h0 = 0;
  for (let j = 0; j < e2; j++) {
    l0 += prof[j]!;
    h0 += prof[m - 1 - j]!;
  }
  l0 /= e2;
  h0 /= e2;
  if (h0 - l0 < 0.02) return null;
  let dark = 0;
  for (let j = 0; j < m - 1; j++) dark += ((h0 - prof[j]!) / (h0 - l0) + (h0 - prof[j + 1]!) / (h0 - l0)) * 0.5 * step;
  return { l0, h0, darkPx: dark };
}

/**
 * Profiles across one edge of the frame, over the middle 70 % of side `side` (outer or inner edge of the stroke),
 * through U (unit square → image px). R, the profiles' half-length in px, is 0.45 of the stroke's width (3–16 px);
 * lengthPx the side's length in image px; lo and hi each profile's black and white levels (linear light).
 */
function sideProfiles(q: QualityInput, U: Mat3, side: number, outer: boolean): { samples: EdgeProfile[]; lo: number[]; hi: number[]; R: number; lengthPx: number } {
  const F = FRAME_FRACTION;
  const { a, b, nt } = UNIT_SIDES[side]!;
  const inset = outer ? 0 : F;
  // black → white direction in the unit frame: outward for the outer edge, inward for the inner one
  const dir = outer ? 1 : -1;
  const K = PROFILES_PER_SIDE;
  const samples: EdgeProfile[] = [];
  const lo: number[] = [];
  const hi: number[] = [];
  let R = 0;
  let lengthPx = 0;
  for (let k = 0; k < K; k++) {
    const f = 0.15 + (0.7 * k) / (K - 1);
    const tx = a[0] + (b[0] - a[0]) * f - nt[0] * inset;
    const ty = a[1] + (b[1] - a[1]) * f - nt[1] * inset;
    const P = applyH(U, tx, ty);
    const Pn = applyH(U, tx + dir * nt[0] * 0.01, ty + dir * nt[1] * 0.01);
    const Pf = applyH(U, tx - dir * nt[0] * F, ty - dir * nt[1] * F);
    const nl = Math.hypot(Pn[0] - P[0], Pn[1] - P[1]);
    if (!(nl > 0)) continue;
    const n: [number, number] = [(Pn[0] - P[0]) / nl, (Pn[1] - P[1]) / nl];
    const strokePx = Math.hypot(Pf[0] - P[0], Pf[1] - P[1]);
    if (k === 0) {
      R = Math.max(3, Math.min(16, 0.45 * strokePx));
      const A = applyH(U, a[0], a[1]);
      const B = applyH(U, b[0], b[1]);
      lengthPx = Math.hypot(B[0] - A[0], B[1] - A[1]);
    }
    const across = profileAcross(q, P, n, R);
    if (!across) continue;
    const edge = edgeByArea(across.prof);
    if (!edge) continue;
    samples.push({ d0: -R + edge.darkPx, prof: across.prof, enc: across.enc, f, n });
    lo.push(edge.l0);
    hi.push(edge.h0);
  }
  return { samples, lo, hi, R, lengthPx };
}

/**
 * The edge spread function averaged over a side, each profile centred on its own edge: normalised darkness
 * (hiM − I)/(hiM − loM) summed per bin of PROFILE_STEP_PX from −R to +R px (sum) with its count (cnt).
 */
interface EdgeSpread {
  sum: Float64Array;
  cnt: Float64Array;
  R: number;
}

function meanEdgeSpread(samples: EdgeProfile[], R: number, loM: number, hiM: number): EdgeSpread {
  const step = PROFILE_STEP_PX;
  const nb = Math.floor((2 * R) / step) + 1;
  const sum = new Float64Array(nb);
  const cnt = new Float64Array(nb);
  for (const smp of samples) {
    for (let j = 0; j < smp.prof.length; j++) {
      const d = -R + j * step - smp.d0;
      const bi = Math.round((d + R) / step);
      if (bi < 0 || bi >= nb) continue;
      sum[bi]! += (hiM - smp.prof[j]!) / (hiM - loM);
      cnt[bi]!++;
    }
  }
  return { sum, cnt, R };
}

/**
 * Variance of the line spread (−d(darkness)/dd) about the edge, px², within |d| ≤ limPx (the part of the window every
 * profile covers). NaN when the spread's area is under 0.5 (no whole edge in the window).
 */
function lineSpreadVariance({ sum, cnt, R }: EdgeSpread, limPx: number): number {
  let g0 = 0;
  let g2 = 0;
  for (let bi = 1; bi < sum.length; bi++) {
    if (!cnt[bi] || !cnt[bi - 1]) continue;
    const d = -R + (bi - 0.5) * PROFILE_STEP_PX;
    if (Math.abs(d) > limPx) continue;
    const g = sum[bi - 1]! / cnt[bi - 1]! - sum[bi]! / cnt[bi]!;
    g0 += g;
    g2 += g * d * d;
  }
  return g0 > 0.5 ? Math.max(0, g2 / g0) : NaN;
}

/** Where the mean darkness falls through level lv (from the white end inwards), px along n; NaN if never. */
function spreadCrossing({ sum, cnt, R }: EdgeSpread, lv: number): number {
  for (let bi = sum.length - 1; bi > 0; bi--) {
    if (!cnt[bi] || !cnt[bi - 1]) continue;
    const a = sum[bi - 1]! / cnt[bi - 1]!;
    const b = sum[bi]! / cnt[bi]!;
    if (a >= lv && b < lv) return -R + (bi - 1 + (a - lv) / (a - b)) * PROFILE_STEP_PX;
  }
  return NaN;
}

/**
 * Shares of clipped samples on a side's profiles: the white (encoded ≥ CLIP_HI over each profile's last 2 px), right
 * at the edge on its white side (max(1, sdPx) px past it) and the black (≤ CLIP_LO over the first 2 px).
 */
function edgeClipping(samples: EdgeProfile[], R: number, sdPx: number): { whiteClipped: number; edgeClipped: number; blackClipped: number } {
  const step = PROFILE_STEP_PX;
  let white = 0;
  let whiteN = 0;
  let edge = 0;
  let black = 0;
  let blackN = 0;
  for (const smp of samples) {
    const m = smp.enc.length;
    for (let j = Math.round(2 / step); j-- > 0; ) {
      white += smp.enc[m - 1 - j]! >= CLIP_HI ? 1 : 0;
      black += smp.enc[j]! <= CLIP_LO ? 1 : 0;
      whiteN++;
      blackN++;
    }
    const at = Math.round((smp.d0 + Math.max(1, sdPx) + R) / step);
    if (at >= 0 && at < m) edge += smp.enc[at]! >= CLIP_HI ? 1 : 0;
  }
  return { whiteClipped: white / whiteN, edgeClipped: edge / samples.length, blackClipped: black / blackN };
}

/**
 * Profiles across the 8 edges of the frame (outer sides, then inner; image px through the corners): spread, levels
 * (linear light), noise and clipping per edge. Edges with fewer than 12 usable profiles are left out.
 */
function targetEdges(q: QualityInput, corners: Corners): EdgeStats[] {
  const U = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], corners);
  const out: EdgeStats[] = [];
  for (const outer of [true, false]) {
    for (let s = 0; s < 4; s++) {
      const { samples, lo, hi, R, lengthPx } = sideProfiles(q, U, s, outer);
      if (samples.length < 12) continue;
      const loM = median(lo);
      const hiM = median(hi);
      const esf = meanEdgeSpread(samples, R, loM, hiM);
      const varPx2 = lineSpreadVariance(esf, R - Math.max(...samples.map((x) => Math.abs(x.d0))) - 0.5);
      // the mean rise's 25 % and 75 % levels (darkness falling from 0.75 to 0.25 from black to white)
      const riseIqPx = spreadCrossing(esf, 0.25) - spreadCrossing(esf, 0.75);
      const clipped = edgeClipping(samples, R, Math.sqrt(Number.isFinite(varPx2) ? varPx2 : 1));
      // scatter of the edge points about a smooth curve along the side (quadratic in f: a lens bends the side)
      const ds = samples.map((x) => x.d0);
      const edgeSdPx = robustSd(quadraticResiduals(samples.map((x) => x.f), ds));
      out.push({ n: samples[0]!.n, varPx2, lengthPx, edgeSdPx, loLin: loM, hiLin: hiM, ...clipped, outer, shiftPx: median(ds), riseIqPx });
    }
  }
  return out;
}

/** Residuals of y from its least-squares quadratic in x. */
function quadraticResiduals(x: number[], y: number[]): number[] {
  // normal equations of y = a + b x + c x², solved by Cramer's rule on the 3 × 3 system
  const S = [0, 0, 0, 0, 0];
  const T = [0, 0, 0];
  for (let i = 0; i < x.length; i++) {
    let p = 1;
    for (let k = 0; k < 5; k++, p *= x[i]!) S[k]! += p;
    T[0]! += y[i]!;
    T[1]! += y[i]! * x[i]!;
    T[2]! += y[i]! * x[i]! * x[i]!;
  }
  const M = [[S[0]!, S[1]!, S[2]!], [S[1]!, S[2]!, S[3]!], [S[2]!, S[3]!, S[4]!]];
  const det3 = (m: number[][]) => m[0]![0]! * (m[1]![1]! * m[2]![2]! - m[1]![2]! * m[2]![1]!) - m[0]![1]! * (m[1]![0]! * m[2]![2]! - m[1]![2]! * m[2]![0]!) + m[0]![2]! * (m[1]![0]! * m[2]![1]! - m[1]![1]! * m[2]![0]!);
  const D = det3(M);
  const coef = [0, 1, 2].map((j) => det3(M.map((row, i) => row.map((v, k) => (k === j ? T[i]! : v)))) / D);
  return x.map((xi, i) => y[i]! - (coef[0]! + coef[1]! * xi + coef[2]! * xi * xi));
}

interface HoleStats {
  /** Anisotropic part of the point spread's covariance, px²: (Σxx − Σyy)/2 and Σxy. */
  dev: [number, number];
  /** Surround less the hole's middle, linear light (0–1). */
  contrast: number;
  /** Noise per px in the rim band, linear light, and the factor by which its correlation between px widens a sum. */
  noise: number;
  corr: number;
  /** The surround's slope across the hole times its radius, over the contrast (moves the rim as seen by the ramp). */
  slopeRatio: number;
  /** The same for the hole's floor. */
  slopeInRatio: number;
  surroundClipped: number;
  diameterPx: number;
}

/** A connected dark blob on the reduced image: bounding box and area in reduced px, centroid in full-resolution px. */
interface DarkBlob {
  left: number;
  top: number;
  widthPx: number;
  heightPx: number;
  area: number;
  x: number;
  y: number;
}

/**
 * Blobs of the reduced image darker than 0.55 of its median level (8-connected, at least 6 reduced px), their
 * centroids mapped to full-resolution image px (pixel centres at integers).
 */
async function darkBlobs(q: QualityInput): Promise<DarkBlob[]> {
  const { small, factor } = q;
  const thr = 0.55 * medianLevel(small.data, 5);
  const bin = new Uint8Array(small.data.length);
  for (let i = 0; i < bin.length; i++) bin[i] = small.data[i]! < thr ? 255 : 0;
  const { cv } = await getCv();
  const src = matFromGrey(cv, bin, small.width, small.height);
  const labels = new cv.Mat() as CvMat;
  const stats = new cv.Mat() as CvMat;
  const cents = new cv.Mat() as CvMat & { data64F: Float64Array };
  const blobs: DarkBlob[] = [];
  try {
    const n = cv.connectedComponentsWithStats(src, labels, stats, cents, 8, cv.CV_32S) as number;
    const st = stats.data32S;
    const ce = cents.data64F;
    for (let i = 1; i < n; i++) {
      const [left, top, widthPx, heightPx, area] = [st[5 * i]!, st[5 * i + 1]!, st[5 * i + 2]!, st[5 * i + 3]!, st[5 * i + 4]!];
      if (area < 6) continue;
      blobs.push({ left, top, widthPx, heightPx, area, x: ce[2 * i]! * factor + (factor - 1) / 2, y: ce[2 * i + 1]! * factor + (factor - 1) / 2 });
    }
  } finally {
    src.delete();
    labels.delete();
    stats.delete();
    cents.delete();
  }
  return blobs;
}

/**
 * The family diameter (mm) whose disc, at `pxPerMm` reduced px per mm, best matches a blob's area (reduced px²), and
 * the mismatch |ln(area / disc area)|.
 */
function nearestFamily(area: number, pxPerMm: number, diametersMm: number[]): { dMm: number; logAreaErr: number } {
  let best = -1;
  let err = Infinity;
  for (const d of diametersMm) {
    const e = Math.abs(Math.log(area / (Math.PI * ((d * pxPerMm) / 2) ** 2)));
    if (e < err) {
      err = e;
      best = d;
    }
  }
  return { dMm: best, logAreaErr: err };
}

/**
 * Up to 48 candidates spread over the photo: the largest family's alone when it has 12 or more (its rims are longest),
 * sorted by size, then y, then x (image px), every stride-th kept.
 */
function spreadSample<T extends { x: number; y: number; dMm: number }>(cands: T[]): T[] {
  cands.sort((a, b) => b.dMm - a.dMm || a.y - b.y || a.x - b.x);
  const big = cands.filter((c) => c.dMm === cands[0]?.dMm);
  const pool = big.length >= 12 ? big : cands;
  const stride = Math.max(1, Math.floor(pool.length / 48));
  return pool.filter((_, i) => i % stride === 0).slice(0, 48);
}

/**
 * Dark blobs of a family's size on the reduced image, away from the target sheet and the border: centres in image
 * px with the family's diameter in mm (H: target mm → image px), and the count of hole-like blobs cut by the border.
 */
async function holeCandidates(q: QualityInput, H: Mat3): Promise<{ cands: { x: number; y: number; dMm: number }[]; atBorder: number }> {
  const { small, factor } = q;
  const Hi = invertHomography(H);
  const S = q.referenceMm;
  const fams = q.pattern.families.map((f) => f.holeDiameter * mmPerUnit(q.pattern));
  const cands: { x: number; y: number; dMm: number; area: number }[] = [];
  let atBorder = 0;
  for (const { left: l, top: t, widthPx: bw, heightPx: bh, area, x, y } of await darkBlobs(q)) {
    const p = applyH(Hi, x, y);
    // the sheet around the target (up to A4 paper) is no place for holes
    if (p[0] > -0.6 * S && p[0] < 1.6 * S && p[1] > -0.6 * S && p[1] < 1.6 * S) continue;
    const s = homographyScale(H, p[0], p[1]) / factor; // reduced px per mm
    if (!(s > 0)) continue;
    const aspect = Math.max(bw, bh) / Math.max(1, Math.min(bw, bh));
    const { dMm: best, logAreaErr: err } = nearestFamily(area, s, fams);
    const border = l <= 0 || t <= 0 || l + bw >= small.width || t + bh >= small.height;
    if (border) {
      if (aspect < 3 && err < Math.log(3)) atBorder++;
      continue;
    }
    if (aspect > 3.5 || err > Math.log(3)) continue;
    cands.push({ x, y, dMm: best, area });
  }
  return { cands: spreadSample(cands), atBorder };
}

/** Jacobian of target mm → image px at the target point p (mm), by 0.5 mm forward differences: [∂x/∂X, ∂x/∂Y, ∂y/∂X, ∂y/∂Y], px per mm. */
function jacobianMmToPx(H: Mat3, p: [number, number]): [number, number, number, number] {
  const e = 0.5;
  const px = applyH(H, p[0] + e, p[1]);
  const py = applyH(H, p[0], p[1] + e);
  const p0 = applyH(H, p[0], p[1]);
  return [(px[0] - p0[0]) / e, (py[0] - p0[0]) / e, (px[1] - p0[1]) / e, (py[1] - p0[1]) / e];
}

/**
 * Second moments (px²) of a uniform disc of radius rMm seen through J (mm → px): a disc has r²/4 per axis, so
 * J (r²/4) Jᵀ, as [xx, yy, xy].
 */
function discMomentsPx(J: [number, number, number, number], rMm: number): [number, number, number] {
  const r2 = (rMm * rMm) / 4;
  return [r2 * (J[0] ** 2 + J[1] ** 2), r2 * (J[2] ** 2 + J[3] ** 2), r2 * (J[0] * J[2] + J[1] * J[3])];
}

/**
 * The bed's level around a hole: 48 samples on each circle of radius R + 1, R + 2.5 and R + 4 px about (cx, cy),
 * image px; linear light (ring) and encoded grey (ringEnc), and the linear samples' median (surround).
 */
function surroundRing(q: QualityInput, cx: number, cy: number, R: number): { ring: number[]; ringEnc: number[]; surround: number } {
  const { grey, width: w, height: h } = q;
  const ring: number[] = [];
  const ringEnc: number[] = [];
  for (const rr of [R + 1, R + 2.5, R + 4])
    for (let k = 0; k < 48; k++) {
      const v = sampleGrey(grey, w, h, cx + rr * Math.cos((k * Math.PI) / 24), cy + rr * Math.sin((k * Math.PI) / 24));
      ringEnc.push(v);
      ring.push(lin(v));
    }
  return { ring, ringEnc, surround: median(ring) };
}

/**
 * Moments of the darkness D = surround − I (linear light, where positive) over the disc of radius R px about
 * (cx, cy): its centroid's offset (mx, my), px, and its central second moments, px². Null when nothing is darker.
 */
function darknessMoments(q: QualityInput, cx: number, cy: number, R: number, surround: number): { mx: number; my: number; sxx: number; syy: number; sxy: number } | null {
  const { grey, width: w } = q;
  let m0 = 0;
  let sx = 0;
  let sy = 0;
  const pts: [number, number, number][] = [];
  for (let y = Math.floor(cy - R); y <= Math.ceil(cy + R); y++)
    for (let x = Math.floor(cx - R); x <= Math.ceil(cx + R); x++) {
      const dx = x - cx;
      const dy = y - cy;
      if (dx * dx + dy * dy > R * R) continue;
      const D = surround - lin(grey[y * w + x]!);
      if (D <= 0) continue;
      m0 += D;
      sx += D * dx;
      sy += D * dy;
      pts.push([dx, dy, D]);
    }
  if (m0 <= 0) return null;
  const mx = sx / m0;
  const my = sy / m0;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (const [dx, dy, D] of pts) {
    sxx += D * (dx - mx) ** 2;
    syy += D * (dy - my) ** 2;
    sxy += D * (dx - mx) * (dy - my);
  }
  return { mx, my, sxx: sxx / m0, syy: syy / m0, sxy: sxy / m0 };
}

/**
 * A hole's darkness centroid and second moments after 4 passes, each re-centred on the last (image px, px²), with
 * the surround ring of the last pass. The window is rPx + 14 px for the first two passes, which see the whole
 * spread; then it closes to 3 spreads past the rim (less noise). Null when a pass finds nothing darker.
 */
function settleHole(q: QualityInput, c: { x: number; y: number }, rPx: number, rMm: number, J: [number, number, number, number]) {
  let cx = c.x;
  let cy = c.y;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  let R = rPx + 14;
  let ring = surroundRing(q, cx, cy, R);
  for (let it = 0; it < 4; it++) {
    if (it === 2) {
      const spread = Math.max(0, (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy) - (rMm * rMm) / 4 * ((J[0] ** 2 + J[1] ** 2 + J[2] ** 2 + J[3] ** 2) / 2));
      R = Math.min(R, rPx + Math.max(3, 3 * Math.sqrt(spread)));
    }
    ring = surroundRing(q, cx, cy, R);
    const mo = darknessMoments(q, cx, cy, R, ring.surround);
    if (!mo) return null;
    ({ sxx, syy, sxy } = mo);
    cx += mo.mx;
    cy += mo.my;
  }
  return { cx, cy, sxx, syy, sxy, ...ring };
}

/** Residuals on a window of image px (origin x0, y0; w × h), NaN where not taken; their sum of squares over n. */
interface RingResiduals {
  x0: number;
  y0: number;
  w: number;
  h: number;
  res: Float64Array;
  sumSq: number;
  n: number;
}

/**
 * The bed's light (linear) on the flat annulus flat0 ≤ ρ ≤ flat1 px about a hole, ρ the distance on the bed plane
 * from its centre c1 (target mm, through Hi) times pxPerMm, less the mean profile at the same ρ (0.25 px bins read
 * between: shading and the rim's tail are not noise). Null when the window leaves the photo.
 */
function flatRingResiduals(q: QualityInput, Hi: Mat3, cx: number, cy: number, c1: [number, number], pxPerMm: number, flat0: number, flat1: number): RingResiduals | null {
  const { grey, width: W, height: Hh } = q;
  const x0 = Math.floor(cx - flat1 - 1);
  const y0 = Math.floor(cy - flat1 - 1);
  const w = Math.ceil(cx + flat1 + 1) - x0 + 1;
  const h = Math.ceil(cy + flat1 + 1) - y0 + 1;
  if (x0 < 0 || y0 < 0 || x0 + w > W || y0 + h > Hh) return null;
  const rhoAt = new Float64Array(w * h).fill(NaN);
  const val = new Float64Array(w * h);
  const bsum = new Map<number, [number, number]>();
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const b = applyH(Hi, x0 + i, y0 + j);
      const rho = Math.hypot(b[0] - c1[0], b[1] - c1[1]) * pxPerMm;
      if (rho < flat0 || rho > flat1) continue;
      const v = lin(grey[(y0 + j) * W + x0 + i]!);
      rhoAt[j * w + i] = rho;
      val[j * w + i] = v;
      const key = Math.round(rho * 4);
      const t = bsum.get(key);
      if (t) { t[0] += v; t[1]++; } else bsum.set(key, [v, 1]);
    }
  const meanAt = (k: number) => { const t = bsum.get(k); return t && t[1] >= 3 ? t[0] / t[1] : NaN; };
  const res = new Float64Array(w * h).fill(NaN);
  let sumSq = 0;
  let n = 0;
  for (let k = 0; k < res.length; k++) {
    const rho = rhoAt[k]!;
    if (!Number.isFinite(rho)) continue;
    const u = rho * 4;
    const k0 = Math.floor(u);
    const a0 = meanAt(k0);
    const a1 = meanAt(k0 + 1);
    const m = Number.isFinite(a0) && Number.isFinite(a1) ? a0 + (a1 - a0) * (u - k0) : Number.isFinite(a0) ? a0 : a1;
    if (!Number.isFinite(m)) continue;
    res[k] = val[k]! - m;
    sumSq += res[k]! ** 2;
    n++;
  }
  return { x0, y0, w, h, res, sumSq, n };
}

/** Mean product of residuals d px apart along x and along y (linear light²): their covariance at lag d. */
function lagCovariance({ res, w, h }: RingResiduals, d: number): number {
  let c = 0;
  let n = 0;
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const e0 = res[j * w + i]!;
      if (!Number.isFinite(e0)) continue;
      if (i + d < w && Number.isFinite(res[j * w + i + d]!)) { c += e0 * res[j * w + i + d]!; n++; }
      if (j + d < h && Number.isFinite(res[(j + d) * w + i]!)) { c += e0 * res[(j + d) * w + i]!; n++; }
    }
  return n ? c / n : 0;
}

/**
 * The surround's slope across the hole, linear light per px: the first harmonic a cos θ + b sin θ of the flat
 * ring's residuals about (cx, cy) by least squares, its amplitude over the ring's mean radius.
 */
function surroundSlope(rr: RingResiduals, cx: number, cy: number, flat0: number, flat1: number): number {
  const { res, w, h, x0, y0 } = rr;
  let sc = 0, ss = 0, cc = 0, sn = 0, cs = 0;
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const e0 = res[j * w + i]!;
      if (!Number.isFinite(e0)) continue;
      const th = Math.atan2(y0 + j - cy, x0 + i - cx);
      const c = Math.cos(th), sv = Math.sin(th);
      sc += e0 * c; ss += e0 * sv; cc += c * c; sn += sv * sv; cs += c * sv;
    }
  const det = cc * sn - cs * cs;
  const ga = det > 0 ? (sc * sn - ss * cs) / det : 0;
  const gb = det > 0 ? (ss * cc - sc * cs) / det : 0;
  return Math.hypot(ga, gb) / ((flat0 + flat1) / 2);
}

/**
 * The hole's floor sloping across it (an insert's flange, a bore wall seen at a tilt), linear light per px: the
 * gradient of a plane fitted to the px within inR px (on the bed plane, as in flatRingResiduals) of its centre.
 * 0 when inR < 2 px or fewer than 8 px.
 */
function floorSlope(q: QualityInput, Hi: Mat3, cx: number, cy: number, c1: [number, number], pxPerMm: number, inR: number): number {
  const { grey, width: w } = q;
  if (inR < 2) return 0;
  let n = 0, m = 0, xx = 0, yy = 0, xy = 0, xv = 0, yv = 0;
  const pts: [number, number, number][] = [];
  for (let y = Math.ceil(cy - inR); y <= Math.floor(cy + inR); y++)
    for (let x = Math.ceil(cx - inR); x <= Math.floor(cx + inR); x++) {
      const b = applyH(Hi, x, y);
      if (Math.hypot(b[0] - c1[0], b[1] - c1[1]) * pxPerMm > inR) continue;
      const v = lin(grey[y * w + x]!);
      pts.push([x - cx, y - cy, v]);
      m += v;
      n++;
    }
  if (n < 8) return 0;
  m /= n;
  for (const [dx, dy, v] of pts) { xx += dx * dx; yy += dy * dy; xy += dx * dy; xv += dx * (v - m); yv += dy * (v - m); }
  const dt = xx * yy - xy * xy;
  return dt > 0 ? Math.hypot((xv * yy - yv * xy) / dt, (yv * xx - xv * xy) / dt) : 0;
}

/** The hole's middle: the median of 16 samples at 0.3 of its radius rPx and one at its centre, linear light. */
function middleLevel(q: QualityInput, cx: number, cy: number, rPx: number): number {
  const { grey, width: w, height: h } = q;
  const inner: number[] = [];
  for (let k = 0; k < 16; k++) inner.push(lin(sampleGrey(grey, w, h, cx + 0.3 * rPx * Math.cos((k * Math.PI) / 8), cy + 0.3 * rPx * Math.sin((k * Math.PI) / 8))));
  inner.push(lin(sampleGrey(grey, w, h, cx, cy)));
  return median(inner);
}

/**
 * Darkness moments of one hole at full resolution (image px), less a disc's seen through the target's perspective
 * (H: target mm → image px, Hi its inverse), with the noise, shading and clipping around it. Null near the border.
 */
function holeMoments(q: QualityInput, H: Mat3, Hi: Mat3, c: { x: number; y: number; dMm: number }): HoleStats | null {
  const { width: w, height: h } = q;
  const J = jacobianMmToPx(H, applyH(Hi, c.x, c.y));
  const rMm = c.dMm / 2;
  const pxPerMm = Math.sqrt(Math.abs(J[0] * J[3] - J[1] * J[2]));
  const rPx = rMm * pxPerMm;
  const R0 = rPx + 14;
  if (c.x - R0 - 4 < 0 || c.y - R0 - 4 < 0 || c.x + R0 + 4 > w - 1 || c.y + R0 + 4 > h - 1) return null;
  const hole = settleHole(q, c, rPx, rMm, J);
  if (!hole) return null;
  const { cx, cy, sxx, syy, sxy } = hole;
  const [dxx, dyy, dxy] = discMomentsPx(J, rMm);
  const ex = sxx - dxx;
  const ey = syy - dyy;
  const exy = sxy - dxy;
  // noise that moves a centre: what the bed around the rim adds to its light (sensor, texture, JPEG), in linear light
  // as the detector weighs it, measured just outside the rim's spread where the profile is flat (inside the spread a
  // px's sub-pixel phase against the rim would pass for noise); and how far it is correlated from one px to the next
  // (a sum over correlated px varies 1 + 2ρ₁ + 2ρ₂ times more)
  const c1 = applyH(Hi, cx, cy);
  const band = 1.5 * Math.sqrt(Math.max(0, (sxx + syy) / 2 - (dxx + dyy) / 2)) + 1;
  const flat0 = rPx + band + 0.5;
  const flat1 = flat0 + 3;
  const rr = flatRingResiduals(q, Hi, cx, cy, c1, pxPerMm, flat0, flat1);
  if (!rr) return null;
  const noiseVar = rr.n > 20 ? rr.sumSq / rr.n : NaN;
  const slope = surroundSlope(rr, cx, cy, flat0, flat1);
  const slopeIn = floorSlope(q, Hi, cx, cy, c1, pxPerMm, rPx - band - 0.5);
  const corr = Number.isFinite(noiseVar) && noiseVar > 0 ? Math.min(10, Math.max(1, 1 + (2 * (lagCovariance(rr, 1) + lagCovariance(rr, 2))) / noiseVar)) : 1;
  const contrast = hole.surround - middleLevel(q, cx, cy, rPx);
  return { dev: [(ex - ey) / 2, exy], contrast, noise: Number.isFinite(noiseVar) ? Math.sqrt(noiseVar) : robustSd(hole.ring), corr, slopeRatio: (slope * rPx) / Math.max(1e-6, contrast), slopeInRatio: (slopeIn * rPx) / Math.max(1e-6, contrast), surroundClipped: hole.ringEnc.filter((v) => v >= CLIP_HI).length / hole.ringEnc.length, diameterPx: 2 * rPx };
}

function tiltFrom(H: Mat3, w: number, h: number, f: number): number {
  const kc = (j: number) => [(H[j]! - (w / 2) * H[6 + j]!) / f, (H[3 + j]! - (h / 2) * H[6 + j]!) / f, H[6 + j]!];
  const r1 = kc(0);
  const r2 = kc(1);
  const n1 = Math.hypot(...r1);
  const n2 = Math.hypot(...r2);
  const a = r1.map((v) => v / n1);
  const b = r2.map((v) => v / n2);
  const r3 = [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
  return (Math.acos(Math.min(1, Math.abs(r3[2]!) / Math.hypot(r3[0]!, r3[1]!, r3[2]!))) * 180) / Math.PI;
}

const round = (v: number, k = 1000) => Math.round(v * k) / k;

/**
 * A straight smear's variance a = L²/12 (px²) along its direction d (image px, unit) from the target's edges: each
 * edge's variance across it is σ² + a·(n·d)² for a defocus σ and a box smear of length L along d (second moments
 * add under convolution). The edges fall in two groups by (n·d)², the target's two side directions; the median of
 * each group gives two equations in σ² and a. Null when fewer than 2 edges a group, or when the groups' (n·d)²
 * differ by less than 0.3 (a smear near the diagonal of the target spreads both side directions alike).
 */
function edgeSmearPx2(edges: readonly { n: [number, number]; varPx2: number }[], d: [number, number]): number | null {
  const c2 = edges.map((e) => (e.n[0] * d[0] + e.n[1] * d[1]) ** 2);
  const across = edges.filter((_, i) => c2[i]! >= 0.5);
  const along = edges.filter((_, i) => c2[i]! < 0.5);
  if (across.length < 2 || along.length < 2) return null;
  const cA = median(c2.filter((c) => c >= 0.5));
  const cB = median(c2.filter((c) => c < 0.5));
  if (cA - cB < 0.3) return null;
  return Math.max(0, (median(across.map((e) => e.varPx2)) - median(along.map((e) => e.varPx2))) / (cA - cB));
}

/** Words for each issue: what was measured and what to do. */
function issue(code: PhotoIssueCode, message: string): PhotoQuality['issues'][number] {
  return { code, message, advice: ISSUE_ADVICE[code] };
}

/** The mean of the four sides of the corners' quadrilateral, image px. */
function meanSidePx(corners: Corners): number {
  const sides = [0, 1, 2, 3].map((i) => Math.hypot(corners[(i + 1) % 4]![0] - corners[i]![0], corners[(i + 1) % 4]![1] - corners[i]![1]));
  return sides.reduce((a, b) => a + b, 0) / 4;
}

/**
 * A straight motion's length L (px) and unit direction d (image px) from the anisotropic part of the point spread:
 * the median of the sampled holes' (Σxx − Σyy)/2 and Σxy (px²), or, with fewer than 5 holes (smeared past the
 * candidate pass, or too small), the orientation mark's (H: target mm → image px). A box of length L along d has
 * variance L²/12 along d and none across, so the anisotropic part's magnitude is L²/24. L = 0 and d = x when neither.
 */
function motionFromSpread(q: QualityInput, holes: HoleStats[], H: Mat3): { L: number; d: [number, number]; motion: PhotoQuality['measured']['motion'] } {
  const spread: [number, number] | null = holes.length >= 5 ? [median(holes.map((x) => x.dev[0])), median(holes.map((x) => x.dev[1]))] : markSpread(q.grey, q.width, q.height, H, q.referenceMm);
  if (!spread) return { L: 0, d: [1, 0], motion: null };
  const [a, b] = spread;
  const L = Math.sqrt(24 * Math.hypot(a, b));
  const th = 0.5 * Math.atan2(b, a);
  return { L, d: [Math.cos(th), Math.sin(th)], motion: { lengthPx: round(L, 10), directionDeg: round((((th * 180) / Math.PI) % 180 + 180) % 180, 1) } };
}

/**
 * The smear, L px along the unit direction d (image px), and its report: from the point spread (motionFromSpread),
 * lengthened to what the target's edges across and along it say (edgeSmearPx2, a = L²/12 px²) where that is more
 * than the holes or the mark give (their moments a flange around the bore or the paper's shading cut short).
 */
function smearOf(q: QualityInput, holes: HoleStats[], H: Mat3, good: EdgeStats[]): ReturnType<typeof motionFromSpread> {
  const smear = motionFromSpread(q, holes, H);
  const fromEdges = smear.motion ? edgeSmearPx2(good, smear.d) : null;
  if (!fromEdges || !(Math.sqrt(12 * fromEdges) > smear.L)) return smear;
  const L = Math.sqrt(12 * fromEdges);
  return { L, d: smear.d, motion: { lengthPx: round(L, 10), directionDeg: smear.motion!.directionDeg } };
}

/**
 * What the target's edges measure (at least 4 with a line spread): the defocus σ (px) as the median over the edges of
 * their spread variance less the motion's L²/12·(n·d)², the edge spread (2.563 σ of the median variance, px), the
 * clipped shares, the white's contrast over the black and its encoded level (0–255). thinningPx: how far the stroke
 * reads thinner than printed at each edge, px, with riseIqPx the edges' 25–75 % rise (NaN with fewer than 2 outer
 * and 2 inner edges).
 */
function edgeMeasures(good: EdgeStats[], holes: HoleStats[], L: number, d: [number, number]) {
  const v = good.map((e) => e.varPx2 - ((L * L) / 12) * (e.n[0] * d[0] + e.n[1] * d[1]) ** 2);
  const sigma2 = Math.max(0, median(v));
  const outer = good.filter((e) => e.outer);
  const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : 0);
  const clipped = {
    targetWhite: round(mean(outer.map((e) => e.whiteClipped))),
    targetEdge: round(mean(outer.map((e) => e.edgeClipped))),
    targetBlack: round(mean(good.map((e) => e.blackClipped))),
    holesSurround: round(holes.length ? median(holes.map((x) => x.surroundClipped)) : 0),
  };
  const hiLin = median(good.map((e) => e.hiLin));
  const loLin = median(good.map((e) => e.loLin));
  // the stroke thinner than printed: its outer and inner edges both moved into the black (the corners' own
  // placement, centreline or outer edge, cancels in the mean), over the edges' rise
  let thinningPx = NaN;
  let riseIqPx = NaN;
  const shift = (o: boolean) => median(good.filter((e) => e.outer === o).map((e) => e.shiftPx));
  if (good.filter((e) => e.outer).length >= 2 && good.filter((e) => !e.outer).length >= 2) {
    thinningPx = -(shift(true) + shift(false)) / 2;
    riseIqPx = median(good.map((e) => e.riseIqPx).filter(Number.isFinite));
  }
  const measured = {
    defocusSigmaPx: round(Math.sqrt(sigma2), 100),
    edgeSpreadPx: round(2.563 * Math.sqrt(median(good.map((e) => e.varPx2))), 100),
    clipped,
    targetContrast: loLin > 0 ? round(hiLin / loLin, 10) : null,
    whiteLevel: round(255 * (hiLin <= 0.0031308 ? 12.92 * hiLin : 1.055 * hiLin ** (1 / 2.4) - 0.055), 10),
  };
  return { measured, thinningPx, riseIqPx };
}

/**
 * The issues against LIMITS, in the report's order: blur, motion, over- and under-exposure, a small target, small
 * holes, tilt, a target at the border, a bed beyond the frame (at the target's scale sCentre px per mm, or 2 holes
 * or more cut by the border). thinningPx and riseIqPx as edgeMeasures gives them.
 */
function photoIssues(q: QualityInput, m: PhotoQuality['measured'], corners: Corners, s: { sidePx: number; sCentre: number; atBorder: number; thinningPx: number; riseIqPx: number }): PhotoQuality['issues'] {
  const { width: w, height: h } = q;
  const { sidePx, sCentre, atBorder, thinningPx, riseIqPx } = s;
  const issues: PhotoQuality['issues'] = [];
  if (m.defocusSigmaPx !== null && m.defocusSigmaPx > LIMITS.defocusSigmaPx) issues.push(issue('blurred', `The target's edges are spread over ${m.edgeSpreadPx!.toFixed(1)} px (out of focus by σ ${m.defocusSigmaPx.toFixed(1)} px; a sharp photo stays under ${LIMITS.defocusSigmaPx} px).`));
  if (m.motion && m.motion.lengthPx > LIMITS.motionPx) issues.push(issue('motion-blur', `The photo is smeared by ${m.motion.lengthPx.toFixed(0)} px along ${m.motion.directionDeg.toFixed(0)}° from the photo's horizontal: the camera moved while it was taken.`));
  const whiteClipped = !!m.clipped && m.clipped.targetWhite >= LIMITS.whiteClipShare;
  const flat = whiteClipped && m.targetContrast !== null && m.targetContrast !== undefined && m.targetContrast < LIMITS.printContrast;
  const thinned = whiteClipped && thinningPx > LIMITS.strokeThinning * riseIqPx;
  if (m.clipped && (flat || thinned || m.clipped.holesSurround > LIMITS.holesClipShare)) {
    const parts = [];
    if (flat) parts.push(`the target's white is burnt out (${Math.round(100 * m.clipped.targetWhite)} % clipped) and reads only ${m.targetContrast!.toFixed(0)} times its black, where a print gives ${LIMITS.printContrast} or more`);
    else if (thinned) parts.push(`the target's white is burnt out (${Math.round(100 * m.clipped.targetWhite)} % clipped) and its black frame reads ${thinningPx.toFixed(2)} px thinner than printed at each edge, ${Math.round((100 * thinningPx) / riseIqPx)} % of the edge's rise`);
    if (m.clipped.holesSurround > LIMITS.holesClipShare) parts.push(`${Math.round(100 * m.clipped.holesSurround)} % of the bed around the holes is burnt out`);
    issues.push(issue('overexposed', `Over-exposed: ${parts.join('; ')}.`));
  }
  if (m.whiteLevel !== null && m.whiteLevel < LIMITS.whiteLevel) issues.push(issue('underexposed', `Under-exposed: the target's white paper reads only ${m.whiteLevel.toFixed(0)} of 255.`));
  if (sidePx < LIMITS.targetSidePx) issues.push(issue('target-small', `The target spans only ${sidePx.toFixed(0)} px a side; at least ${LIMITS.targetSidePx} px are wanted to set the scale.`));
  if (m.holeDiameterPx! < LIMITS.holeDiameterPx) issues.push(issue('holes-small', `The smallest holes are only ${m.holeDiameterPx!.toFixed(1)} px across; at least ${LIMITS.holeDiameterPx} px are wanted to find their centres.`));
  if (m.tiltDeg! > LIMITS.tiltDeg) issues.push(issue('tilted', `The camera looked at the bed ${m.tiltDeg!.toFixed(0)}° off straight down; up to ${LIMITS.tiltDeg}° is fine.`));
  const margin = 0.05 * sidePx;
  if (corners.some(([x, y]) => x < margin || y < margin || x > w - 1 - margin || y > h - 1 - margin)) issues.push(issue('target-cut', 'The target touches the border of the photo: its edge there cannot be measured.'));
  const k = mmPerUnit(q.pattern);
  const bw = q.pattern.bed.width * k * sCentre;
  const bh = q.pattern.bed.height * k * sCentre;
  const fits = (bw <= 1.05 * w && bh <= 1.05 * h) || (bw <= 1.05 * h && bh <= 1.05 * w);
  if (!fits || atBorder >= 2) issues.push(issue('bed-cut', !fits ? `At the target's scale the bed is ${bw.toFixed(0)} × ${bh.toFixed(0)} px, larger than the ${w} × ${h} px photo: part of it is outside.` : `${atBorder} holes are cut by the border of the photo: the bed runs off it.`));
  return issues;
}

/**
 * The target's corners' 1σ per image axis, px: as the square stage measured it, or from the curve model (header):
 * the outer edges' point scatter through the quadratic's end leverage 15.2/n, halved in variance for the stroke's
 * centreline, over the frame's inner share.
 */
function cornerSigmaPx(q: QualityInput, good: EdgeStats[], sidePx: number): number {
  const outerEdges = good.filter((e) => e.outer);
  const edgeSd = Math.sqrt(median(outerEdges.map((e) => e.edgeSdPx ** 2)));
  const nSide = Math.max(12, Math.min(200, Math.floor(sidePx / 2)));
  return q.cornerSigmaPx ?? (edgeSd * Math.sqrt(15.2 / nSide)) / Math.SQRT2 / (1 - FRAME_FRACTION);
}

/**
 * A hole position's predicted 2-D RMS error, mm: √2 × the per-axis centre σ from the rim's noise and shading
 * (header), each family at its own size (sCentre px per mm at the target), weighted by its count; sb the
 * Gaussian-equivalent line spread, px.
 */
function holePositionMm(q: QualityInput, holes: HoleStats[], sb: number, sCentre: number): number {
  const k = mmPerUnit(q.pattern);
  const dH = median(holes.map((x) => x.contrast));
  const nH = median(holes.map((x) => x.noise));
  const cH = median(holes.map((x) => x.corr));
  // the surround brighter on one side by ΔL(θ) = G·r·cos θ moves the ramp's half-way crossing of a blurred rim by
  // −σ_b·ΔL/(Φ'(z₀)·ΔL̄)·0.55 (z₀ = Φ⁻¹(0.55), Φ' = 0.396), i.e. 1.39·σ_b·G·r/ΔL̄ cos θ: a disc of radius r + a cos θ has
  // its centroid moved by a. The floor sloping by G'·r moves it by (1 − 0.55)/0.396 = 1.14·σ_b·G'·r/ΔL̄. Per axis half
  // the squares, over the sampled holes (each family alike, relative to r).
  const shadeVarPx = holes.reduce((acc, x) => acc + ((1.39 * sb * x.slopeRatio) ** 2 + (1.14 * sb * x.slopeInRatio) ** 2) / 2, 0) / holes.length;
  // the detector's centroid weighs each px by a ramp from 35 % to 75 % of the way from hole to surround: a px in
  // that band (a ring 1.06 σ_b wide, at least 0.4 px for a pixel-sharp edge) moves the weight by δI / (0.4 ΔI);
  // over the ring's 2πr·band px at distance r, of a total weight πr²: var = σ²·band / (0.16 π ΔI² r) per axis for
  // noise independent from px to px, times 1 + 2ρ₁ + 2ρ₂ for noise correlated over neighbours (linear light)
  const bandPx = Math.max(0.4, 1.06 * sb);
  let num = 0;
  let cnt = 0;
  for (const fm of q.pattern.families) {
    const rPx = (fm.holeDiameter * k * sCentre) / 2;
    const varAxisPx = (nH * nH * cH * bandPx) / (0.16 * Math.PI * dH * dH * rPx) + shadeVarPx;
    const nPos = fm.count.x * fm.count.y;
    num += nPos * (varAxisPx / (sCentre * sCentre));
    cnt += nPos;
  }
  return Math.sqrt(2 * (num / cnt));
}

/**
 * Measures the photo's quality and predicts the accuracy it can reach. Fast: a few hundred profiles on the target
 * and moments of up to 48 holes; the decode and the square search it needs are the analysis's own first steps.
 */
export async function measureQuality(q: QualityInput): Promise<PhotoQuality> {
  const t0 = performance.now();
  const { width: w, height: h } = q;
  const measured: PhotoQuality['measured'] = { widthPx: w, heightPx: h, targetContrast: null, edgeSpreadPx: null, defocusSigmaPx: null, motion: null, targetSidePx: null, holeDiameterPx: null, tiltDeg: null, clipped: null, whiteLevel: null, holesSampled: 0 };
  const issues: PhotoQuality['issues'] = [];
  const done = (predicted: PhotoQuality['predicted']): PhotoQuality => ({ issues, predicted, measured, timeMs: round(performance.now() - t0, 10) });
  if (!q.corners) {
    issues.push(issue('target-cut', 'No whole reference target was found in the photo: it is cut by the border, hidden, glared or missing.'));
    return done(null);
  }
  const corners = q.corners;
  // a target cut by the border can leave its orientation mark whole, found as a small filled square
  const mark = q.cutMark !== undefined ? q.cutMark : cutTargetMark(q.grey, w, h, corners);
  if (mark) {
    issues.push(issue('target-cut', mark.offPhoto ? 'Only the target\'s corner mark is whole in the photo: the border cuts through the target.' : 'Only the target\'s corner mark was found whole: its frame is hidden or glared.'));
    return done(null);
  }
  const S = q.referenceMm;
  const H = homographyFrom4(targetCornersMm(S), corners);
  const Hi = invertHomography(H);
  const sidePx = meanSidePx(corners);
  measured.targetSidePx = round(sidePx, 10);
  const f = q.focalPx ?? (ASSUMED_FOCAL_35MM / Math.hypot(36, 24)) * Math.hypot(w, h);
  measured.tiltDeg = round(tiltFrom(H, w, h, f), 10);

  const edges = targetEdges(q, corners);
  const { cands, atBorder } = await holeCandidates(q, H);
  const holes = cands.map((c) => holeMoments(q, H, Hi, c)).filter((x): x is HoleStats => x !== null);
  measured.holesSampled = holes.length;
  const good = edges.filter((e) => Number.isFinite(e.varPx2));
  const { L, d, motion } = smearOf(q, holes, H, good);
  if (motion) measured.motion = motion;
  const smallestMm = Math.min(...q.pattern.families.map((fm) => fm.holeDiameter * mmPerUnit(q.pattern)));
  const sCentre = homographyScale(H, S / 2, S / 2); // px per mm at the target
  measured.holeDiameterPx = round(smallestMm * sCentre, 10);
  let stroke = { thinningPx: NaN, riseIqPx: NaN };
  if (good.length >= 4) {
    const edgeMeasured = edgeMeasures(good, holes, L, d);
    Object.assign(measured, edgeMeasured.measured);
    stroke = edgeMeasured;
  }
  issues.push(...photoIssues(q, measured, corners, { sidePx, sCentre, atBorder, ...stroke }));

  // prediction: the scale along each photo axis from the corners' σ over the side (header); the holes' positions
  if (!good.length || measured.defocusSigmaPx === null) return done(null);
  // Gaussian-equivalent line spread averaged over directions (a box of L: L²/12 along d, 0 across, mean L²/24)
  const sb = Math.sqrt(measured.defocusSigmaPx ** 2 + (L * L) / 24 + 1e-6);
  const scalePpm = (1e6 * cornerSigmaPx(q, good, sidePx)) / sidePx;
  const positionMm = holes.length ? holePositionMm(q, holes, sb, sCentre) : NaN;
  return done(Number.isFinite(positionMm) ? { positionMm: round(positionMm, 1e5), scalePpm: round(scalePpm, 10) } : null);
}
