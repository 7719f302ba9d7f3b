/**
 * Stage 2 — first matches. Detections (image px) are sized through the reference square's frame (mm), mapped onto
 * the lattice (bed mm) by the square's rectification, the lattice's turn, phase and whole-pitch shift
 * (correspond.ts), and assigned to nodes within 0.3 pitch. A detector that sizes holes consistently large or small
 * (an insert's rim, a chamfer) is allowed for: when too few detections fit the nominal sizes, sizes are matched
 * loosely first and `kappa`, the median ratio of detected to nominal diameter, is taken from these matches.
 */
import { assign, initialImageToBed, type Assignment } from '../correspond';
import { GeometryInputError } from '../errors';
import { homographyScale } from '../homography';
import { applyH } from '../linalg';
import { median } from '../robust';
import type { AnalysisInput } from './input';
import { familiesBySize, mapDetections, matchedPairs, minPitchMm, MIN_MATCHED, requireMatches, type MatchedPairs } from './matching';

export interface FirstMatch {
  assignment: Assignment;
  pairs: MatchedPairs;
  /** Detected over nominal hole diameter (1 unless the detector's sizes are off). */
  kappa: number;
  /** Whole-pitch placements that explain the detections about as well as the chosen one (1 = unique). */
  tiedShifts: number;
}

/** Below this fraction of usable detections fitting a nominal size, sizes are matched loosely and `kappa` is measured. */
const SIZED_WIDE_FRACTION = 0.3;

/**
 * @param tol relative diameter mismatch within which a detection may belong to a family (e.g. 0.35)
 */
export function firstMatch(inp: AnalysisInput, tol: number): FirstMatch {
  const { detections: det, usable, lattice: lat, square } = inp;
  const squareMmPerPx = (i: number) => homographyScale(square.fromImage, det.u[i]!, det.v[i]!);
  let famOf = familiesBySize(inp, squareMmPerPx, tol, 1);
  const nUsable = usable.reduce((a, b) => a + b, 0);
  const sizedWide = famOf.filter((f) => f.length).length < SIZED_WIDE_FRACTION * nUsable;
  if (sizedWide) famOf = familiesBySize(inp, squareMmPerPx, 1.0, 1);

  const init = initialImageToBed(lat, det, usable, famOf, square.fromImage, square.toImage);
  if (!init) throw new GeometryInputError('holes', `fewer than ${MIN_MATCHED} holes could be matched to the pattern (no lattice found)`);
  const bedXY = mapDetections(inp, new Float64Array(2 * det.n), (u, v) => applyH(init.H, u, v));
  const assignment = assign(lat, bedXY, det.n, usable, famOf, (f) => 0.3 * minPitchMm(lat, f));
  const pairs = matchedPairs(inp, assignment);
  requireMatches(pairs.src.length);
  const kappa = sizedWide
    ? median(pairs.idx.map((i) => (det.dPx[i]! * squareMmPerPx(i)) / lat.families[lat.positions[assignment.posOf[i]!]!.family]!.family.holeDiameter))
    : 1;
  return { assignment, pairs, kappa, tiedShifts: init.tiedShifts };
}
