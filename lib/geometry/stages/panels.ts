/**
 * Stage 10 — panels and seams (bed mm, rad). A panel's rigid offset (dx, dy mm) and turn (rad → degrees) are the
 * fit's, zero-mean over the fitted panels; 1σ from the fit's covariance (`paramCov`). A seam between two neighbouring
 * panels is the difference of their displacements at the seam's midpoint, (dx − ρ·Δy, dy + ρ·Δx) each, with its σ
 * from the joint covariance of the two panels' parameters.
 */
import { panelParams, paramCov, paramQuadratic, paramSigma, type BedModel } from '../bedfit';
import type { Report } from '../contract';
import { neighbourPanels, type Lattice } from '../lattice';
import { panelCorrection } from '../verdict';

const DEG = 180 / Math.PI;

/** The report's panels: offset, turn, positions seen, 1σ and the correction in words. */
export function panelReport(lat: Lattice, model: BedModel, positions: Report['positions']): Report['panels'] {
  return lat.panels.map((q, j) => {
    const p = panelParams(model, j);
    const count = positions.filter((pos, k) => lat.positions[k]!.panel === j && pos.measured).length;
    if (lat.panels.length === 1) return { id: q.id, dx: 0, dy: 0, rotationDeg: 0, positions: count, uncertaintyMm: 0, correction: 'no correction: a single panel is the reference for itself' };
    if (!p) return { id: q.id, dx: 0, dy: 0, rotationDeg: 0, positions: count, uncertaintyMm: Math.hypot(q.width, q.height), correction: 'not enough holes seen on this panel to place it' };
    const dx = model.panelDx[j]!, dy = model.panelDy[j]!, rot = model.panelRot[j]!;
    const u = Math.sqrt(Math.max(0, (paramCov(model, p.dx, p.dx) + paramCov(model, p.dy, p.dy)) / 2));
    return { id: q.id, dx, dy, rotationDeg: rot * DEG, positions: count, uncertaintyMm: u, rotationUncertaintyDeg: paramSigma(model, p.rot) * DEG, correction: panelCorrection(dx, dy, rot * DEG) };
  });
}

/** The report's seams between neighbouring fitted panels: step (mm) and its 1σ (mean per axis). */
export function seamReport(lat: Lattice, model: BedModel): Report['seams'] {
  const seams: Report['seams'] = [];
  for (const nb of neighbourPanels(lat.panels)) {
    const pa = panelParams(model, nb.a), pb = panelParams(model, nb.b);
    if (!pa || !pb) continue;
    const A = lat.panels[nb.a]!, B = lat.panels[nb.b]!;
    // Displacement of panel j at the seam point: (dx − ρ·Δy, dy + ρ·Δx), linear in (dx, dy, ρ).
    const disp = (j: number, c: { cx: number; cy: number }) => ({
      gx: [1, 0, -(nb.y - c.cy)], gy: [0, 1, nb.x - c.cx],
      x: model.panelDx[j]! - model.panelRot[j]! * (nb.y - c.cy), y: model.panelDy[j]! + model.panelRot[j]! * (nb.x - c.cx),
    });
    const da = disp(nb.a, A), db = disp(nb.b, B);
    const idx = [pa.dx, pa.dy, pa.rot, pb.dx, pb.dy, pb.rot];
    const variance = (g: number[]) => Math.max(0, paramQuadratic(model, idx, g));
    const sx = variance([...da.gx.map((v) => -v), ...db.gx]), sy = variance([...da.gy.map((v) => -v), ...db.gy]);
    const dx = db.x - da.x, dy = db.y - da.y;
    seams.push({ a: A.id, b: B.id, dx, dy, r: Math.hypot(dx, dy), uncertaintyMm: Math.sqrt((sx + sy) / 2) });
  }
  return seams;
}
