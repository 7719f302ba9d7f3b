/**
 * Stage 8 — positions on the bed. Each measured position's detection is mapped into the lattice frame (mm), through
 * the shape-only map into the true (metric) frame, and placed on nominal by the best rigid fit (Umeyama) of the
 * fitted positions; its deviation (bed mm) has a 1σ per axis of √((σ_centre · mm/px)² + shape term), the shape term
 * growing with the distance from the fitted positions' centroid (shape.ts). A position not seen is `missing`, marked
 * `hidden` when it would lie under the reference sheet or be seen only in part — a hole the detector saw in part
 * (`points.hidden`), or a rim that meets the sheet or the photo's border — with the reason (`hiddenBy`), and
 * `outOfView` when outside the photo; those are not expected to be seen, and never in or out.
 */
import type { Mat2 } from '../affine';
import { holeToLatticeMap, mmPerPxAt, predictPx, type BedModel } from '../bedfit';
import type { HiddenReason, Report } from '../contract';
import type { Assignment } from '../correspond';
import { shapeDisplacementVar } from '../shape';
import { insideQuad } from '../square';
import { rigid2 } from '../umeyama';
import { positionVerdict } from '../verdict';
import type { AnalysisInput } from './input';
import { ON_SHEET_PAD } from './input';

export interface PlacedPositions {
  positions: Report['positions'];
  /** 1 for a position under the reference sheet. */
  hidden: Uint8Array;
  /** 1 for a position that could not be seen (hidden or outside the photo). */
  notExpected: Uint8Array;
  /** Each measured position's detection in the lattice frame (mm, holeToLattice; x, y per position, NaN if none). */
  latticeMm: Float64Array;
}

/**
 * @param shapeOnly lattice frame → true frame (shape only)
 * @param shapeCov covariance of (scale X, scale Y, squareness rad), or null when the shape is not observed
 * @param centreSigmaPx 1σ of a detected centre, px
 * @param familyVarMm2 per-axis variance that its family's common offset leaves in a position, mm², by family
 *   (familyOffsetVarMm2)
 */
export function placePositions(
  inp: AnalysisInput, model: BedModel, assignment: Assignment, inFit: Uint8Array, shapeOnly: Mat2, shapeCov: readonly number[] | null, centreSigmaPx: number, familyVarMm2: Float64Array,
): PlacedPositions {
  const { detections: det, lattice: lat, square } = inp;
  const { width: W, height: H } = inp.image;
  const Ls = shapeOnly;
  const P = lat.positions.length;
  // True (metric) frame position of each measured position, and the fitted ones' nominal → metric pairs.
  const mXY = new Float64Array(2 * P).fill(NaN), latticeMm = new Float64Array(2 * P).fill(NaN);
  const toLattice = holeToLatticeMap(model);
  const fitX: number[] = [], fitY: number[] = [], fitW: number[] = [];
  for (let i = 0; i < det.n; i++) {
    const pos = assignment.posOf[i]!;
    if (pos < 0) continue;
    const [x, y] = toLattice(det.u[i]!, det.v[i]!, lat.families[lat.positions[pos]!.family]!.family.holeDiameter / 2);
    latticeMm[2 * pos] = x; latticeMm[2 * pos + 1] = y;
    mXY[2 * pos] = Ls[0] * x + Ls[1] * y; mXY[2 * pos + 1] = Ls[2] * x + Ls[3] * y;
    if (inFit[i]) { const q = lat.positions[pos]!; fitX.push(q.x, q.y); fitY.push(mXY[2 * pos]!, mXY[2 * pos + 1]!); fitW.push(1); }
  }
  const rg = rigid2(fitX, fitY, fitW.length);
  const rc = Math.cos(rg.angleRad), rs = Math.sin(rg.angleRad);
  let cxm = 0, cym = 0;
  for (let k = 0; k < fitW.length; k++) { cxm += fitX[2 * k]!; cym += fitX[2 * k + 1]!; }
  cxm /= Math.max(1, fitW.length); cym /= Math.max(1, fitW.length);

  const hidden = new Uint8Array(P), notExpected = new Uint8Array(P);
  const spots = inp.points.hidden ?? [];
  const positions: Report['positions'] = lat.positions.map((q, pos) => {
    const fam = lat.families[q.family]!;
    const panel = lat.panels[q.panel]!.implicit ? null : lat.panels[q.panel]!.id;
    const base = { family: fam.id, col: q.col, row: q.row, label: q.label, panel, nominal: { x: q.x, y: q.y }, toleranceMm: fam.toleranceMm };
    const d = assignment.detOf[pos]!;
    if (d < 0) {
      const [pu, pv] = predictPx(model, q.x, q.y, q.panel, lat.panels);
      const away = !(pu >= 0 && pv >= 0 && pu < W && pv < H);
      const rPx = fam.family.holeDiameter / 2 / Math.max(1e-9, mmPerPxAt(model, pu, pv));
      // under the printed square; a hole the detector saw in part (the nearest spot within a radius); a rim that meets
      // the sheet or the border
      let by: HiddenReason | null = insideQuad(square.corners, pu, pv, ON_SHEET_PAD * square.sidePx) ? 'sheet' : null;
      if (!by) {
        let best = rPx;
        for (const sp of spots) { const dd = Math.hypot(sp.x - pu, sp.y - pv); if (dd < best) { best = dd; by = sp.by; } }
      }
      if (!by && !away) by = inp.rimMeets(pu, pv, rPx);
      const hid = by !== null;
      hidden[pos] = hid ? 1 : 0;
      notExpected[pos] = hid || away ? 1 : 0;
      return { ...base, measured: null, deviation: null, uncertaintyMm: null, verdict: 'missing' as const, ...(hid ? { hidden: true, hiddenBy: by! } : {}), ...(away ? { outOfView: true } : {}) };
    }
    const mx = mXY[2 * pos]! - rg.tx, my = mXY[2 * pos + 1]! - rg.ty;
    const x = rc * mx + rs * my, y = -rs * mx + rc * my;
    const dx = x - q.x, dy = y - q.y, r = Math.hypot(dx, dy);
    const s = mmPerPxAt(model, det.u[d]!, det.v[d]!);
    const ex = q.x - cxm, ey = q.y - cym;
    const shapeVar = shapeCov ? shapeDisplacementVar(shapeCov, ex, ey) : 0;
    const u = Math.sqrt((centreSigmaPx * s) ** 2 + (familyVarMm2[q.family] ?? 0) + shapeVar);
    return { ...base, measured: { x, y }, deviation: { dx, dy, r }, uncertaintyMm: u, verdict: positionVerdict(r, u, fam.toleranceMm) };
  });
  return { positions, hidden, notExpected, latticeMm };
}
