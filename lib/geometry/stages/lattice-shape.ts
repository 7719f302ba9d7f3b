/**
 * Stage 6 — the lattice's global shape (shape.ts): the reference square's corners (image px), undistorted and mapped
 * into the lattice frame (mm), give the linear map L from lattice-frame to true lengths (scale X, scale Y,
 * squareness; unitless and rad) with its covariance. A sheet of known thickness is allowed for (its top face is
 * nearer the camera), measured distances between positions refine the terms (distances.ts), and the terms are
 * reported only when the square can observe them (their 1σ within the caller's limits and the square agreeing with
 * the lattice within 5 % and 2°).
 */
import { decomposeAffine, type Mat2 } from '../affine';
import { holeToLattice, mmPerPxAt, type BedModel } from '../bedfit';
import { MeasuredDistancesSchema, type MeasuredDistance, type Report } from '../contract';
import type { Assignment } from '../correspond';
import { applyDistances } from '../distances';
import { latticeShape, squarePrecision, type ShapeEstimate, type SquarePrecision } from '../shape';
import { parseOrThrow, type AnalysisInput } from './input';

const DEG = 180 / Math.PI;

/** Shape from the square alone, and the corner precision it used. */
export function shapeFromSquare(inp: AnalysisInput, model: BedModel, cornerSigmaPx?: number): { shape: ShapeEstimate; precision: SquarePrecision } {
  const precision = squarePrecision(inp.points.reference, inp.square.corners, cornerSigmaPx);
  return { shape: latticeShape(model, inp.square.corners, inp.points.reference.sizeMm, precision), precision };
}

/**
 * The shape again for a sheet `thicknessMm` thick: its top face is that much nearer the camera than the bed, at a
 * distance D = f · (size / side px) mm, so it looks larger by D / (D − t).
 */
export function shapeForSheetThickness(inp: AnalysisInput, model: BedModel, precision: SquarePrecision, focalPx: number, thicknessMm: number): ShapeEstimate {
  const sizeMm = inp.points.reference.sizeMm;
  const distMm = focalPx * (sizeMm / inp.square.sidePx);
  return latticeShape(model, inp.square.corners, (sizeMm * distMm) / Math.max(distMm - thicknessMm, 1e-6), precision);
}

/**
 * Measured distances between positions combined with the square's shape as weighted information; a position's
 * centre is its detection mapped into the lattice frame (mm), its 1σ the centre σ (px) times the local scale.
 */
export function shapeWithDistances(
  inp: AnalysisInput, model: BedModel, assignment: Assignment, shape: ShapeEstimate, distances: readonly MeasuredDistance[], centreSigmaPx: number,
): { shape: ShapeEstimate; rows: NonNullable<Report['distances']> } {
  const given = parseOrThrow(MeasuredDistancesSchema, distances, 'distances');
  const det = inp.detections;
  return applyDistances(shape, given, inp.lattice, (pos) => {
    const d = assignment.detOf[pos]!;
    return d < 0 ? null : { xyMm: holeToLattice(model, det.u[d]!, det.v[d]!, inp.lattice.families[inp.lattice.positions[pos]!.family]!.family.holeDiameter / 2), sigmaMm: centreSigmaPx * mmPerPxAt(model, det.u[d]!, det.v[d]!) };
  });
}

export interface ShapeVerdict {
  /** Whether the square observes the shape well enough to report it. */
  observed: boolean;
  /** Why not, in words. */
  reason?: string;
  /** Lattice frame → true frame with the square's turn on the bed removed (X axis kept fixed); identity when not observed. */
  shapeOnly: Mat2;
}

/**
 * @param maxScaleSigma largest 1σ of scale X or Y still reported (unitless)
 * @param maxSquarenessSigmaDeg largest 1σ of squareness still reported, degrees
 */
export function judgeShape(shape: ShapeEstimate, maxScaleSigma: number, maxSquarenessSigmaDeg: number): ShapeVerdict {
  const maxSq = maxSquarenessSigmaDeg / DEG;
  const sig = shape.sigma;
  let observed = Number.isFinite(sig.scaleX) && Number.isFinite(sig.scaleY) && Number.isFinite(sig.squarenessRad) && sig.scaleX <= maxScaleSigma && sig.scaleY <= maxScaleSigma && sig.squarenessRad <= maxSq;
  let reason: string | undefined;
  if (!observed) reason = `the reference square (${shape.squareSidePx.toFixed(0)} px across) cannot separate the lattice's scale and squareness from the camera's perspective to better than ${(Math.max(sig.scaleX, sig.scaleY) * 1e6).toFixed(0)} ppm and ${(sig.squarenessRad * DEG).toFixed(3)}°; a larger square or a straighter view is needed`;
  if (observed && (Math.abs(shape.terms.scaleX - 1) > 0.05 || Math.abs(shape.terms.scaleY - 1) > 0.05 || Math.abs(shape.terms.squarenessRad) > 2 / DEG)) {
    observed = false;
    reason = `the lattice and the reference square disagree by more than 5 % in scale or 2° in squareness; check the square's size and corners`;
  }
  const L: Mat2 = observed ? shape.L : [1, 0, 0, 1];
  // The rotation gauge of L is the square's turn on the bed; remove it so L is shape only (keep the X axis fixed).
  const tL = decomposeAffine(L);
  const cr = Math.cos(-tL.rotationRad), sr = Math.sin(-tL.rotationRad);
  const shapeOnly: Mat2 = [cr * L[0] - sr * L[2], cr * L[1] - sr * L[3], sr * L[0] + cr * L[2], sr * L[1] + cr * L[3]];
  return { observed, ...(reason ? { reason } : {}), shapeOnly };
}
