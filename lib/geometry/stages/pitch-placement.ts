/**
 * Stage 4 — whole-pitch placement, judged again through the robust homography. The first placement was made in the
 * reference square's own frame, which strong perspective stretches far from a small square, so it can be off by a
 * pitch: the matched holes then fit a lattice one pitch over and the holes along one edge go unmatched. Through the
 * refined map (perspective included) every detection lands near a node (bed mm); a shift by whole pitches of a
 * family, or by the offset between the origins of families of one size (a staggered grid), that matches more
 * detections wins; ties keep the current placement, so a partial view keeps its centring.
 */
import { assign, confusableOffsets, type Assignment } from '../correspond';
import { homographyDlt } from '../homography';
import { nearestNode } from '../lattice';
import { applyH, mat3Inv, type Mat3 } from '../linalg';
import type { AnalysisInput } from './input';
import { mapDetections, matchedPairs, minPitchMm, type MatchedPairs } from './matching';

/** Whole pitches tried each way on each axis. */
const MAX_PITCHES = 2;
/** The cheap score looks at an even sample of at most this many detections. */
const SCORE_SAMPLE = 300;

export function wholePitchPlacement(
  inp: AnalysisInput, m: { assignment: Assignment; pairs: MatchedPairs; famOf: number[][]; bedToImage: Mat3 },
): { assignment: Assignment; pairs: MatchedPairs; bedToImage: Mat3 } {
  const { detections: det, usable, lattice: lat } = inp;
  const n = det.n, famOf = m.famOf;
  const pitches = (axis: 'x' | 'y') => [...new Set(lat.families.map((f) => f.family.pitch[axis]))];
  const inv = mat3Inv(m.bedToImage);
  const base = mapDetections(inp, new Float64Array(2 * n), (u, v) => applyH(inv, u, v));
  // How many sampled detections land within the gate of a node of a family their size fits.
  const step = Math.max(1, Math.ceil(n / SCORE_SAMPLE));
  const score = (sx: number, sy: number) => {
    let c = 0;
    for (let i = 0; i < n; i += step) {
      if (!usable[i]) continue;
      for (const f of famOf[i]!) if (nearestNode(lat, f, base[2 * i]! + sx, base[2 * i + 1]! + sy).dist < 0.25 * minPitchMm(lat, f)) { c++; break; }
    }
    return c;
  };
  let best = { c: score(0, 0), sx: 0, sy: 0 };
  const offs: [number, number][] = [];
  lat.families.forEach((_, fi) => { for (const o of confusableOffsets(lat, fi)) if (!offs.some((q) => q[0] === o[0] && q[1] === o[1])) offs.push(o); });
  for (const [ox, oy] of offs) for (const px of pitches('x')) for (const py of pitches('y'))
    for (let kx = -MAX_PITCHES; kx <= MAX_PITCHES; kx++) for (let ky = -MAX_PITCHES; ky <= MAX_PITCHES; ky++) {
      const sx = ox + kx * px, sy = oy + ky * py;
      if (!sx && !sy) continue;
      const c = score(sx, sy);
      if (c > best.c) best = { c, sx, sy };
    }
  if (best.sx || best.sy) {
    const shifted = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) { shifted[2 * i] = base[2 * i]! + best.sx; shifted[2 * i + 1] = base[2 * i + 1]! + best.sy; }
    const a2 = assign(lat, shifted, n, usable, famOf, (f) => 0.25 * minPitchMm(lat, f));
    const p2 = matchedPairs(inp, a2);
    if (p2.src.length > m.pairs.src.length) return { assignment: a2, pairs: p2, bedToImage: homographyDlt(p2.src, p2.dst) };
  }
  return { assignment: m.assignment, pairs: m.pairs, bedToImage: m.bedToImage };
}
