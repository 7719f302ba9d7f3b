/**
 * Stage 5 — the joint fit of lens and bed (bedfit.ts: observed px = distort(H(panel_j(nominal mm)))), alternated with
 * reassignment. Each round maps every detection through the fitted lens and homography into the lattice frame (mm)
 * and reassigns it within a tight gate around its node moved by its panel's fitted offset; the fit is redone until
 * the assignment stops changing (at most 3 rounds). Then holes too far off to be trusted in the fit are still
 * reported: a detection left over is matched to a free node within a wide gate if its diameter fits closely; it is
 * measured but not in the fit.
 */
import { fitBed, mmPerPxAt, toLattice, type BedModel } from '../bedfit';
import type { Lens } from '../camera';
import { assign, type Assignment } from '../correspond';
import type { Mat3 } from '../linalg';
import type { AnalysisInput } from './input';
import { familiesBySize, mapDetections, matchedPairs, minPitchMm, requireMatches } from './matching';

const FIT_ROUNDS = 3;
/** Diameter tolerance (relative) and largest gate (mm) of the wide gate. */
const WIDE_DIAMETER_TOL = 0.15;
const WIDE_GATE_MM = 5;

export interface LensAndBedFit {
  model: BedModel;
  /** The final assignment: the fit's matches plus those of the wide gate. */
  assignment: Assignment;
  /** 1 for a detection whose match is in the fit. */
  inFit: Uint8Array;
  /** Number of matches in the fit. */
  fitCount: number;
}

/**
 * @param start assignment and bed → image homography (mm → px) from the correspondence stages
 * @param kappa detected over nominal diameter
 * @param tol relative diameter tolerance
 */
export function fitLensAndBed(
  inp: AnalysisInput, start: { assignment: Assignment; bedToImage: Mat3 }, kappa: number, tol: number, fitDistortion?: boolean,
): LensAndBedFit {
  const { detections: det, usable, lattice: lat, image } = inp;
  const n = det.n;
  const lens0: Lens = { fPx: image.startFocalPx, cx: image.width / 2, cy: image.height / 2, k1: 0, k2: 0 };
  const runFit = (a: Assignment, warm?: BedModel) => {
    const p = matchedPairs(inp, a);
    const nominal = new Float64Array(2 * p.idx.length), observed = new Float64Array(2 * p.idx.length), panel = new Int32Array(p.idx.length), family = new Int32Array(p.idx.length), radiusMm = new Float64Array(p.idx.length), w = new Float64Array(p.idx.length);
    p.idx.forEach((i, k) => { const pos = lat.positions[a.posOf[i]!]!; nominal[2 * k] = pos.x; nominal[2 * k + 1] = pos.y; observed[2 * k] = det.u[i]!; observed[2 * k + 1] = det.v[i]!; panel[k] = pos.panel; family[k] = pos.family; radiusMm[k] = lat.families[pos.family]!.family.holeDiameter / 2; w[k] = det.conf[i]!; });
    return { model: fitBed({ nominal, observed, panel, family, radiusMm, n: p.idx.length, panels: lat.panels, lens: lens0, H0: start.bedToImage, fitDistortion, weights: w, warm }), idx: p.idx };
  };
  // Where a position is expected in the lattice frame (mm): its nominal point moved by its panel's fitted offset.
  const expectedAt = (m: BedModel) => (pos: number): [number, number] => {
    const q = lat.positions[pos]!, P = lat.panels[q.panel]!;
    const c = Math.cos(m.panelRot[q.panel]!), s = Math.sin(m.panelRot[q.panel]!);
    const ax = q.x - P.cx, ay = q.y - P.cy;
    return [P.cx + c * ax - s * ay + m.panelDx[q.panel]!, P.cy + s * ax + c * ay + m.panelDy[q.panel]!];
  };
  // Tight gate for the fit: a hole's own residual, beyond its panel's move (mm).
  const tightGate = (fi: number) => {
    const f = lat.families[fi]!;
    return Math.min(0.3 * minPitchMm(lat, fi), Math.max(1.0, 0.15 * f.family.holeDiameter, 4 * f.toleranceMm));
  };

  const bedXY = new Float64Array(2 * n);
  let assignment = start.assignment;
  let fit = runFit(assignment);
  for (let round = 0; round < FIT_ROUNDS; round++) {
    const m = fit.model;
    mapDetections(inp, bedXY, (u, v) => toLattice(m, u, v));
    const famOf = familiesBySize(inp, (i) => mmPerPxAt(m, det.u[i]!, det.v[i]!), tol, kappa);
    const prev = assignment.posOf;
    assignment = assign(lat, bedXY, n, usable, famOf, tightGate, expectedAt(m));
    requireMatches(matchedPairs(inp, assignment).idx.length);
    // Stop once the assignment no longer changes (the first round always refits with the tight gate).
    if (round > 0 && assignment.posOf.every((p, i) => p === prev[i])) break;
    fit = runFit(assignment, m);
  }
  const model = fit.model;
  const inFit = new Uint8Array(n);
  for (const i of fit.idx) inFit[i] = 1;

  // Wide gate: tight diameter match, free node only.
  mapDetections(inp, bedXY, (u, v) => toLattice(model, u, v));
  const famTight = familiesBySize(inp, (i) => mmPerPxAt(model, det.u[i]!, det.v[i]!), WIDE_DIAMETER_TOL, kappa);
  const free = new Uint8Array(n);
  for (let i = 0; i < n; i++) free[i] = usable[i] && assignment.posOf[i]! < 0 ? 1 : 0;
  const wide = assign(lat, bedXY, n, free, famTight, (f) => Math.min(0.3 * minPitchMm(lat, f), WIDE_GATE_MM), expectedAt(model));
  for (let i = 0; i < n; i++) { const p = wide.posOf[i]!; if (p >= 0 && assignment.detOf[p]! < 0) { assignment.posOf[i] = p; assignment.detOf[p] = i; } }
  return { model, assignment, inFit, fitCount: fit.idx.length };
}
