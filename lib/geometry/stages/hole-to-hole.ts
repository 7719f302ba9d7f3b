/**
 * Stage 9 — hole to hole (form.ts). Each measured position in the lattice frame (mm, before the square's shape is
 * applied) minus the best robust affine of the fitted positions onto nominal: what a fixture spanning part of the bed
 * feels, independent of the reference square. Then the overall size and squareness check: the largest displacement
 * (mm) the square's shape terms, with the stretch or shear the form affine found, make at any nominal position.
 */
import { decomposeAffine, type Mat2 } from '../affine';
import { mmPerPxAt, type BedModel } from '../bedfit';
import type { Report, ReportShapeCheck } from '../contract';
import type { Assignment } from '../correspond';
import { formFit, positionForm, shapeCheck } from '../form';
import type { AnalysisInput } from './input';

/**
 * Adds `form` to each measured position (in place) and returns the overall shape check.
 * @param latticeMm each measured position's detection in the lattice frame, mm (x, y per position; placePositions)
 * @param shapeOnly lattice frame → true frame (shape only)
 * @param shapeSigma 1σ of the shape terms when observed, else null (the check then cannot judge)
 */
export function holeToHole(
  inp: AnalysisInput, model: BedModel, assignment: Assignment, inFit: Uint8Array, positions: Report['positions'], latticeMm: Float64Array,
  shapeOnly: Mat2, shapeSigma: { scaleX: number; scaleY: number; squarenessRad: number } | null, centreSigmaPx: number, familyVarMm2: Float64Array,
): ReportShapeCheck {
  const { detections: det, lattice: lat } = inp;
  const formAt = positions.flatMap((p, pos) => (p.measured ? [pos] : []));
  const detAt = (pos: number) => assignment.detOf[pos]!;
  const form = formFit(
    formAt.flatMap((pos) => [lat.positions[pos]!.x, lat.positions[pos]!.y]),
    formAt.flatMap((pos) => [latticeMm[2 * pos]!, latticeMm[2 * pos + 1]!]),
    formAt.map((pos) => Math.sqrt((centreSigmaPx * mmPerPxAt(model, det.u[detAt(pos)]!, det.v[detAt(pos)]!)) ** 2 + (familyVarMm2[lat.positions[pos]!.family] ?? 0))),
    formAt.map((pos) => inFit[detAt(pos)]!),
  );
  formAt.forEach((pos, k) => { positions[pos]!.form = positionForm(form, k, positions[pos]!.toleranceMm); });
  // Overall size and squareness: the square's shape with the stretch or shear the panels' offsets make together.
  const Ls = shapeOnly, Lf = form.affine.L;
  const Lt: Mat2 = [Ls[0] * Lf[0] + Ls[1] * Lf[2], Ls[0] * Lf[1] + Ls[1] * Lf[3], Ls[2] * Lf[0] + Ls[3] * Lf[2], Ls[2] * Lf[1] + Ls[3] * Lf[3]];
  return shapeCheck(lat.positions.flatMap((q) => [q.x, q.y]), lat.positions.length, shapeSigma ? decomposeAffine(Lt) : null, shapeSigma, Math.min(...lat.families.map((f) => f.toleranceMm)));
}
