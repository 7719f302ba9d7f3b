/**
 * Stage 11 — the lattice's terms for the report: its turn in the photo (degrees, bed +X as seen, counter-clockwise
 * positive, at the bed's centre; 1σ from the fit's covariance), and scale X, scale Y, squareness (degrees) with their
 * 1σ when the square observes them, else null with the reason.
 */
import type { BedModel } from '../bedfit';
import type { Report, ReportShapeCheck } from '../contract';
import { applyH, type Mat3 } from '../linalg';
import { globalSigma, type ShapeEstimate } from '../shape';
import type { PatternMm } from '../units';
import type { ShapeVerdict } from './lattice-shape';

const DEG = 180 / Math.PI;

/** Turn of bed +X in the photo, degrees (image y is down, so counter-clockwise as seen is −v). */
export function photoRotationDeg(bedToImage: Mat3, pm: PatternMm): number {
  const c0 = applyH(bedToImage, pm.bed.width / 2, pm.bed.height / 2), c1 = applyH(bedToImage, pm.bed.width / 2 + 100, pm.bed.height / 2);
  return Math.atan2(-(c1[1] - c0[1]), c1[0] - c0[0]) * DEG;
}

export function latticeReport(pm: PatternMm, model: BedModel, shape: ShapeEstimate, verdict: ShapeVerdict, shapeCheck: ReportShapeCheck): Report['lattice'] {
  const { observed, reason } = verdict;
  const sig = shape.sigma;
  return {
    rotationDeg: photoRotationDeg(model.H, pm),
    scaleX: observed ? shape.terms.scaleX : null,
    scaleY: observed ? shape.terms.scaleY : null,
    squarenessDeg: observed ? shape.terms.squarenessRad * DEG : null,
    observed,
    ...(reason ? { reason } : {}),
    uncertainty: {
      rotationDeg: globalSigma(model, (h) => photoRotationDeg(h, pm)),
      scaleX: observed ? sig.scaleX : null, scaleY: observed ? sig.scaleY : null, squarenessDeg: observed ? sig.squarenessRad * DEG : null,
    },
    shapeCheck,
  };
}
