/**
 * Comparison of two reports of one bed (bed frame, mm): per-position change vectors (b − a of the measured
 * positions, each already placed on the bed by its own best rigid fit), panel moves, and whether each change is
 * larger than the two measurements' combined uncertainty at 95 % (the 2-D band of band.ts: r > 2.448 σ,
 * σ = √(σa² + σb²)).
 */
import { beyondBand, combinedSigmaMm } from './band';
import type { Report } from './contract';

export interface PositionChange { label: string; family: string; col: number; row: number; dx: number; dy: number; r: number; uncertaintyMm: number; significant: boolean }
export interface PanelChange { id: string; dx: number; dy: number; rotationDeg: number; uncertaintyMm: number; significant: boolean }
export interface Comparison {
  positions: PositionChange[];
  panels: PanelChange[];
  /** Positions seen in one report only. */
  onlyInA: string[];
  onlyInB: string[];
  summary: { compared: number; significant: number; maxChangeMm: number; rmsChangeMm: number; sentence: string };
}

export function compareReports(a: Report, b: Report): Comparison {
  const key = (p: Report['positions'][number]) => `${p.family}:${p.col}:${p.row}`;
  const bm = new Map(b.positions.map((p) => [key(p), p]));
  const positions: PositionChange[] = [];
  const onlyInA: string[] = [], onlyInB: string[] = [];
  for (const p of a.positions) {
    const q = bm.get(key(p));
    if (!p.measured || !q?.measured) { if (p.measured && !q?.measured) onlyInA.push(p.label); continue; }
    const dx = q.measured.x - p.measured.x, dy = q.measured.y - p.measured.y, r = Math.hypot(dx, dy);
    const u = combinedSigmaMm(p.uncertaintyMm ?? 0, q.uncertaintyMm ?? 0);
    positions.push({ label: p.label, family: p.family, col: p.col, row: p.row, dx, dy, r, uncertaintyMm: u, significant: beyondBand(r, u) });
  }
  const am = new Map(a.positions.map((p) => [key(p), p]));
  for (const q of b.positions) if (q.measured && !am.get(key(q))?.measured) onlyInB.push(q.label);
  const bp = new Map(b.panels.map((p) => [p.id, p]));
  const panels: PanelChange[] = [];
  for (const p of a.panels) {
    const q = bp.get(p.id);
    if (!q) continue;
    const dx = q.dx - p.dx, dy = q.dy - p.dy;
    const u = combinedSigmaMm(p.uncertaintyMm, q.uncertaintyMm);
    panels.push({ id: p.id, dx, dy, rotationDeg: q.rotationDeg - p.rotationDeg, uncertaintyMm: u, significant: beyondBand(Math.hypot(dx, dy), u) });
  }
  const sig = positions.filter((c) => c.significant);
  const max = positions.reduce((m, c) => Math.max(m, c.r), 0);
  const rms = positions.length ? Math.sqrt(positions.reduce((s, c) => s + c.r * c.r, 0) / positions.length) : 0;
  const movedPanels = panels.filter((p) => p.significant).map((p) => p.id);
  const sentence = sig.length === 0 && movedPanels.length === 0
    ? `No change beyond the measurements' uncertainty over ${positions.length} positions (largest ${max.toFixed(2)} mm).`
    : `${sig.length} of ${positions.length} positions moved beyond the measurements' uncertainty (largest ${max.toFixed(2)} mm)${movedPanels.length ? `; panels ${movedPanels.join(', ')} moved` : ''}.`;
  return { positions, panels, onlyInA, onlyInB, summary: { compared: positions.length, significant: sig.length, maxChangeMm: max, rmsChangeMm: rms, sentence } };
}
