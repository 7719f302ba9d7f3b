/** Helpers for comparing a report with the truth of a synthetic scene (bed frame, mm). */
import type { Report } from '@/lib/geometry/contract';
import type { Lattice } from '@/lib/geometry/lattice';
import type { SceneTruth } from '@/lib/geometry/synthetic';
import { rigid2 } from '@/lib/geometry/umeyama';

/** True deviation of every seen position: true position placed on the nominal by the best rigid fit, minus nominal. */
export function trueDeviations(lat: Lattice, truth: SceneTruth): Float64Array {
  const idx = lat.positions.map((_, i) => i).filter((i) => truth.seen[i]);
  const x = idx.flatMap((i) => [truth.trueXY[2 * i]!, truth.trueXY[2 * i + 1]!]);
  const y = idx.flatMap((i) => [lat.positions[i]!.x, lat.positions[i]!.y]);
  const r = rigid2(x, y, idx.length);
  const c = Math.cos(r.angleRad), s = Math.sin(r.angleRad);
  const out = new Float64Array(2 * lat.positions.length).fill(NaN);
  lat.positions.forEach((q, i) => {
    const tx = truth.trueXY[2 * i]!, ty = truth.trueXY[2 * i + 1]!;
    out[2 * i] = c * tx - s * ty + r.tx - q.x;
    out[2 * i + 1] = s * tx + c * ty + r.ty - q.y;
  });
  return out;
}

/** Truth panel offsets in the report's gauge: zero mean of dx, dy and turn over the panels. */
export function gaugedTruthPanels(lat: Lattice, truth: SceneTruth): { dx: number; dy: number; rot: number }[] {
  const n = lat.panels.length;
  const xm = lat.panels.reduce((s, p) => s + p.cx, 0) / n, ym = lat.panels.reduce((s, p) => s + p.cy, 0) / n;
  const rm = truth.panelRotRad.reduce((s, v) => s + v, 0) / n;
  const raw = lat.panels.map((p, j) => ({ dx: truth.panelDx[j]! + rm * (p.cy - ym), dy: truth.panelDy[j]! - rm * (p.cx - xm), rot: truth.panelRotRad[j]! - rm }));
  const mx = raw.reduce((s, v) => s + v.dx, 0) / n, my = raw.reduce((s, v) => s + v.dy, 0) / n;
  return raw.map((v) => ({ dx: v.dx - mx, dy: v.dy - my, rot: v.rot }));
}

/** Largest ratio of (distance between measured and true position) to the position's stated 1σ uncertainty. */
export function maxMeasuredErrorSigmas(report: Report, dev: Float64Array): number {
  let m = 0;
  report.positions.forEach((p, i) => {
    if (!p.deviation) return;
    m = Math.max(m, Math.hypot(p.deviation.dx - dev[2 * i]!, p.deviation.dy - dev[2 * i + 1]!) / p.uncertaintyMm!);
  });
  return m;
}
