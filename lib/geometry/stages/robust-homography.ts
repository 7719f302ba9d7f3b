/**
 * Stage 3 — robust homography bed → image. From the first matches (nominal bed mm → observed image px): RANSAC on an
 * even subsample of at most 300 pairs (a wrong phase in part of the photo cannot pull it), the DLT of the inliers
 * among all pairs, then two rounds of Huber IRLS (at 2 robust σ, px), each followed by mapping every detection
 * through the inverse into the bed frame (mm) and reassigning within 0.25 pitch.
 */
import { assign, type Assignment } from '../correspond';
import { homographyDlt, homographyScale } from '../homography';
import { applyH, mat3Inv, type Mat3 } from '../linalg';
import { huberWeight, madSigma, median, ransac } from '../robust';
import type { AnalysisInput } from './input';
import { familiesBySize, mapDetections, matchedPairs, minPitchMm, MIN_MATCHED, requireMatches, type MatchedPairs } from './matching';

export interface RobustMatch {
  assignment: Assignment;
  pairs: MatchedPairs;
  /** Families each detection's size fits, through the refined map. */
  famOf: number[][];
  /** Bed lattice frame (mm) → image px. */
  bedToImage: Mat3;
}

/** RANSAC gate, as a fraction of the smallest pitch (converted to px at the square's scale). */
const RANSAC_GATE_PITCH = 0.15;
const RANSAC_MAX_PAIRS = 300;

/**
 * @param first the first matches and the detector's size ratio kappa
 * @param tol relative diameter tolerance
 */
export function robustHomography(inp: AnalysisInput, first: { pairs: MatchedPairs; kappa: number }, tol: number): RobustMatch {
  const { detections: det, usable, lattice: lat, square } = inp;
  let pr = first.pairs;
  const pxPerMm = 1 / Math.max(1e-9, median(pr.idx.map((i) => homographyScale(square.fromImage, det.u[i]!, det.v[i]!))));
  const gatePx = RANSAC_GATE_PITCH * Math.min(...lat.families.map((_, f) => minPitchMm(lat, f))) * pxPerMm;
  const sub = pr.src.map((_, k) => k).filter((k) => k % Math.max(1, Math.ceil(pr.src.length / RANSAC_MAX_PAIRS)) === 0);
  const resid = (h: Mat3, k: number) => { const p = applyH(h, pr.src[k]![0], pr.src[k]![1]); return Math.hypot(p[0] - pr.dst[k]![0], p[1] - pr.dst[k]![1]); };
  const consensus = ransac(sub.length, 4, (ix) => { try { return homographyDlt(ix.map((k) => pr.src[sub[k]!]!), ix.map((k) => pr.dst[sub[k]!]!)); } catch { return null; } },
    (h, k) => resid(h, sub[k]!), gatePx, { iterations: 40, seed: 1 });
  const inl = consensus ? pr.src.map((_, k) => k).filter((k) => resid(consensus.model, k) < gatePx) : [];
  let H = inl.length >= MIN_MATCHED ? homographyDlt(inl.map((k) => pr.src[k]!), inl.map((k) => pr.dst[k]!)) : homographyDlt(pr.src, pr.dst);

  const bedXY = new Float64Array(2 * det.n);
  let famOf: number[][] = [];
  let assignment: Assignment | undefined;
  for (let it = 0; it < 2; it++) {
    const r = pr.src.map((s, k) => { const p = applyH(H, s[0], s[1]); return Math.hypot(p[0] - pr.dst[k]![0], p[1] - pr.dst[k]![1]); });
    const sg = Math.max(madSigma(r), 0.05);
    H = homographyDlt(pr.src, pr.dst, r.map((x) => huberWeight(x, 2 * sg)));
    const inv = mat3Inv(H);
    mapDetections(inp, bedXY, (u, v) => applyH(inv, u, v));
    famOf = familiesBySize(inp, (i) => homographyScale(inv, det.u[i]!, det.v[i]!), tol, first.kappa);
    assignment = assign(lat, bedXY, det.n, usable, famOf, (f) => 0.25 * minPitchMm(lat, f));
    pr = matchedPairs(inp, assignment);
    requireMatches(pr.src.length);
  }
  return { assignment: assignment!, pairs: pr, famOf, bedToImage: H };
}
