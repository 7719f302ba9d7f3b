/**
 * Finding hole centres, in three stages:
 * 1. candidates: dark blobs of the reduced image of about a family's size (hole-candidates.ts);
 * 2. each candidate measured at full resolution on the bed plane (hole-refine.ts), then kept as a detection when
 *    its rim is round and its size is a family's;
 * 3. one detection per hole: of any that overlap, the most confident.
 * The centre is mapped back to original image px through the square's homography.
 *
 * Frames: image px (origin top-left, +y down, pixel centres at integers); bed plane = the reference square's frame,
 * mm (see target.ts). `H` maps the square frame (mm) to image px.
 */
import { applyH, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { findCandidates, nearestFamily, type FamilySize, type HoleCandidate } from './hole-candidates';
import { fitBlurredRim, radialProfile } from './blurred-rim';
import { planeSampler, refineHole, type CentreMethod, type Refined } from './hole-refine';

export type { CentreMethod } from './hole-refine';
export type { FamilySize } from './hole-candidates';

/**
 * Largest shift of a dark/light edge by the camera's processing, px per side (blur in linear light, tone curves and
 * unsharp masks move the half-way crossing by about −0.5 to +0.55 px in the rendered pipelines).
 */
export const EDGE_BIAS_PX = 0.6;

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

/**
 * Measures one candidate: a detection when it refines to a round rim of a family's size; a rim broken or out of
 * round (a hole seen in part) goes to `onPartial`; null otherwise.
 */
function measureCandidate(grey: Float32Array, w: number, h: number, H: Mat3, c: HoleCandidate, families: FamilySize[], method: CentreMethod, tol: number, onPartial?: (p: PartialHole) => void): HoleDetection | null {
  const partial = (px: number, py: number, diameterPx: number) => {
    const p = applyH(H, px, py);
    onPartial!({ x: p[0], y: p[1], diameterPx, planeMm: [px, py] });
  };
  const r = refineHole(grey, w, h, H, c.x, c.y, c.fam.diameterMm / 2, method, onPartial ? (px, py, rr) => partial(px, py, 2 * rr * homographyScale(H, px, py)) : undefined);
  if (!r) return null;
  if (r.roundness > 0.08) {
    // a dark blob of a hole's size and contrast whose rim is out of round: a rim cut straight (sheet, board) or broken
    if (onPartial && r.contrast >= 10) partial(r.cx, r.cy, r.diameterMm * homographyScale(H, r.cx, r.cy));
    return null;
  }
  const s = homographyScale(H, r.cx, r.cy);
  const size = familySize(families, r.diameterMm, s, tol) ?? blurImpliedSize(grey, w, h, H, r, c.fam, families, s, tol);
  if (!size) return null;
  const { fam, err, allow, diameterMm } = size;
  const p = applyH(H, r.cx, r.cy);
  const conf = Math.min(1, Math.max(0, (r.contrast - 10) / 40)) * Math.max(0, 1 - r.roundness / 0.08) * Math.max(0, 1 - err / (allow * 1.5)) * r.coverage;
  return { x: p[0], y: p[1], diameterPx: diameterMm * s, diameterMm, confidence: Math.round(conf * 1000) / 1000, family: fam.id, planeMm: [r.cx, r.cy], contrast: r.contrast, rimGapDeg: r.rimGapDeg };
}

/** A diameter's family when it is within the size gate: the relative tolerance beside the camera's edge bias. */
type SizeMatch = { fam: FamilySize; err: number; allow: number; diameterMm: number };

/**
 * The family whose size a measured diameter (mm; s px per mm there) matches: within `tol` of it, and 2 ×
 * EDGE_BIAS_PX beside (the camera's tone curve and sharpening move a dark/light edge by up to that much on each
 * side, which matters for holes a few px across); null when none.
 */
function familySize(families: FamilySize[], diameterMm: number, s: number, tol: number): SizeMatch | null {
  const { fam, err } = nearestFamily(families, diameterMm);
  if (!fam) return null;
  const allow = tol + (2 * EDGE_BIAS_PX) / (s * fam.diameterMm);
  return err > allow ? null : { fam, err, allow, diameterMm };
}

/**
 * The size gate for a rim that blur has closed in (blurred-rim.ts): a hole read smaller than its candidate's
 * family, whose radial profile is that of a disc blurred by σ ≥ 1 px, judged by the diameter that fit implies.
 * The model must fit the profile to a tenth of the hole's depth.
 */
function blurImpliedSize(grey: Float32Array, w: number, h: number, H: Mat3, r: Refined, candidate: FamilySize, families: FamilySize[], s: number, tol: number): SizeMatch | null {
  if (r.diameterMm >= candidate.diameterMm) return null;
  const rPx = (candidate.diameterMm / 2) * s;
  const step = 0.5;
  const profile = radialProfile(planeSampler(grey, w, h, H), r.cx, r.cy, 1 / s, 1.3 * rPx + 10, step);
  const fit = fitBlurredRim(profile, step, rPx);
  if (!fit || fit.sigmaPx < 1 || fit.rms > 0.1 * fit.depth) return null;
  return familySize(families, (2 * fit.rPx) / s, s, tol);
}

/** One detection per hole: of any that overlap (centres closer than half the smaller diameter), the most confident. */
function onePerHole(found: HoleDetection[]): HoleDetection[] {
  const out = [...found].sort((a, b) => b.confidence - a.confidence);
  const kept: HoleDetection[] = [];
  for (const d of out) {
    if (kept.some((k) => Math.hypot(k.planeMm[0] - d.planeMm[0], k.planeMm[1] - d.planeMm[1]) < 0.5 * Math.min(k.diameterMm, d.diameterMm))) continue;
    kept.push(d);
  }
  return kept;
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
  const cands = await findCandidates(small, factor, w, h, H, families, search.exclude);
  const found: HoleDetection[] = [];
  for (const c of cands) {
    const d = measureCandidate(grey, w, h, H, c, families, method, tol, search.onPartial);
    if (d) found.push(d);
  }
  return onePerHole(found);
}
