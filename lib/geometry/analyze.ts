/**
 * analyzePoints: detected hole centres (image px, origin top-left, +y down) and a reference square → the report
 * (bed frame mm, origin front-left, +X right, +Y away from the operator). A pipeline of named stages, each in
 * lib/geometry/stages/ under its own name, in this order (README.md describes the method):
 * input → first matches → robust homography → whole-pitch placement → lens and bed fit → lattice shape (with the
 * camera's focal length, sheet thickness and measured distances) → positions → hole to hole → panels and seams →
 * lattice terms and camera → warnings and summary.
 */
import { familyOffsetVarMm2 } from './bedfit';
import type { MeasuredDistance, Pattern, Points, Report } from './contract';
import { prepareInput } from './stages/input';
import { firstMatch } from './stages/first-match';
import { robustHomography } from './stages/robust-homography';
import { wholePitchPlacement } from './stages/pitch-placement';
import { fitLensAndBed } from './stages/fit';
import { judgeShape, shapeForSheetThickness, shapeFromSquare, shapeWithDistances } from './stages/lattice-shape';
import { cameraReport, focalLength } from './stages/camera';
import { placePositions } from './stages/positions';
import { holeToHole } from './stages/hole-to-hole';
import { panelReport, seamReport } from './stages/panels';
import { latticeReport } from './stages/lattice-terms';
import { reportSummary, reportWarnings } from './stages/warnings';

export interface AnalyzeOptions {
  /**
   * 1σ precision of the reference square's corners, px. Overrides `points.reference.cornerSigmaPx`; without either,
   * 0.1 px raised to the square's own residual (shape.ts).
   */
  cornerSigmaPx?: number;
  /** Relative diameter mismatch (e.g. 0.35 = ±35 %) within which a detection may belong to a family. */
  diameterTolerance?: number;
  /** Thickness of the reference sheet, mm: its top face sits this far above the bed (default 0). */
  referenceThicknessMm?: number;
  /**
   * 1σ precision of a detected hole centre, px, if the detector knows it. Without it the fit's residual scatter is
   * used, which also holds the holes' own scatter and so errs on the cautious side.
   */
  centreSigmaPx?: number;
  /**
   * Distances measured between two positions (labels as the report writes them), combined with the reference
   * square's estimate of scale and squareness (distances.ts).
   */
  distances?: readonly MeasuredDistance[];
  /** Fit Brown–Conrady k1, k2 (default true). */
  fitDistortion?: boolean;
  /** Least-accurate shape terms still reported as observed: 1σ of scale (default 0.003) and squareness (° , 0.2). */
  maxScaleSigma?: number;
  maxSquarenessSigmaDeg?: number;
}

/** Default relative diameter tolerance (±35 %). */
const DIAMETER_TOLERANCE = 0.35;
/** Default limits of the shape terms' 1σ still reported as observed: scale (unitless) and squareness (degrees). */
const MAX_SCALE_SIGMA = 0.003, MAX_SQUARENESS_SIGMA_DEG = 0.2;

/**
 * Measures a bed from one photo's detections.
 * @param points detections and reference square, image px
 * @param pattern the bed's nominal pattern (mm or in)
 * @returns the report, bed frame mm; throws GeometryInputError naming the field on bad input
 */
export function analyzePoints(points: Points, pattern: Pattern, options: AnalyzeOptions = {}): Report {
  const inp = prepareInput(points, pattern);
  const lat = inp.lattice;
  const tol = options.diameterTolerance ?? DIAMETER_TOLERANCE;

  // Correspondence: which detection is which position.
  const first = firstMatch(inp, tol);
  const robust = robustHomography(inp, first, tol);
  const placed = wholePitchPlacement(inp, robust);

  // The joint fit of lens, perspective and panels.
  const { model, assignment, inFit, fitCount } = fitLensAndBed(inp, placed, first.kappa, tol, options.fitDistortion);
  const centreSigmaPx = Math.max(options.centreSigmaPx ?? model.sigmaPx, 1e-4);

  // The lattice's shape from the square; the focal length is needed only for a thick sheet and to report the camera.
  const square = shapeFromSquare(inp, model, options.cornerSigmaPx);
  const focal = focalLength(inp, model, square.shape.L);
  const tMm = options.referenceThicknessMm ?? 0;
  let shape = tMm > 0 ? shapeForSheetThickness(inp, model, square.precision, focal.focalPx, tMm) : square.shape;
  let distanceRows: Report['distances'];
  if (options.distances?.length) ({ shape, rows: distanceRows } = shapeWithDistances(inp, model, assignment, shape, options.distances, centreSigmaPx));
  const verdict = judgeShape(shape, options.maxScaleSigma ?? MAX_SCALE_SIGMA, options.maxSquarenessSigmaDeg ?? MAX_SQUARENESS_SIGMA_DEG);

  // Positions, hole to hole, panels.
  const familyVarMm2 = familyOffsetVarMm2(model);
  // each family's common offset against the one with the most matches (mm, lattice frame), where the fit had one
  const familyOffsets = model.familyParam.some((p) => p >= 0)
    ? lat.families.map((f, i) => ({ family: f.id, dx: model.familyDx[i] ?? 0, dy: model.familyDy[i] ?? 0 }))
    : [];
  const { positions, hidden, notExpected, latticeMm } = placePositions(inp, model, assignment, inFit, verdict.shapeOnly, verdict.observed ? shape.cov : null, centreSigmaPx, familyVarMm2);
  const shapeCheck = holeToHole(inp, model, assignment, inFit, positions, latticeMm, verdict.shapeOnly, verdict.observed ? shape.sigma : null, centreSigmaPx, familyVarMm2);
  const panels = panelReport(lat, model, positions);
  const seams = seamReport(lat, model);

  const unmatched: Report['unmatched'] = [];
  for (let i = 0; i < inp.detections.n; i++) if (assignment.posOf[i]! < 0) unmatched.push({ x: inp.detections.u[i]!, y: inp.detections.v[i]! });
  return {
    version: 1, units: 'mm', pattern: { name: inp.pattern.name }, positions, unmatched, panels, seams,
    lattice: latticeReport(inp.pattern, model, shape, verdict, shapeCheck),
    camera: cameraReport(inp, model, focal),
    summary: reportSummary(positions, panels, lat, notExpected, shapeCheck, first.tiedShifts),
    warnings: reportWarnings(first.tiedShifts, verdict.reason, distanceRows),
    ...(distanceRows ? { distances: distanceRows } : {}),
    diagnostics: {
      scaleSigmaParts: { corners: shape.parts.cornersScale, fit: shape.parts.fitScale }, diameterRatio: first.kappa, residualSigmaPx: model.sigmaPx,
      centreSigmaPx, inFit: fitCount, squareSidePx: shape.squareSidePx, cornerSigmaPx: shape.cornerSigmaPx, squareResidualPx: shape.squareResidualPx,
      hidden: hidden.reduce((a, b) => a + b, 0),
      ...(familyOffsets.length ? { familyOffsetsMm: familyOffsets.map((o, i) => ({ ...o, sigmaMm: Math.sqrt(familyVarMm2[i] ?? 0) })) } : {}),
    },
  };
}
