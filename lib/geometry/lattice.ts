/**
 * The nominal lattice: every expected position of every family, in the bed frame (mm, origin front-left, +X
 * right, +Y away from the operator), with its label and panel, minus positions inside T-track channels.
 * Node lookup maps a bed-frame point to the nearest (col, row) of a family in O(1).
 */
import type { Family, Rect } from './contract';
import { radialToleranceMm } from './fits';
import { positionLabel } from './labels';
import type { PatternMm } from './units';

export interface PanelInfo { id: string; x: number; y: number; width: number; height: number; cx: number; cy: number; implicit: boolean }
export interface NominalPosition { family: number; col: number; row: number; x: number; y: number; panel: number; label: string }
export interface FamilyInfo { id: string; family: Family; toleranceMm: number; /** node (row·count.x + col) → position index, −1 if excluded. */ node: Int32Array }
export interface Lattice { positions: NominalPosition[]; panels: PanelInfo[]; families: FamilyInfo[]; pattern: PatternMm }

const inside = (r: Rect, x: number, y: number, pad = 0) => x >= r.x - pad && x <= r.x + r.width + pad && y >= r.y - pad && y <= r.y + r.height + pad;

function distToRect(r: Rect, x: number, y: number): number {
  const dx = Math.max(r.x - x, 0, x - (r.x + r.width)), dy = Math.max(r.y - y, 0, y - (r.y + r.height));
  return Math.hypot(dx, dy);
}

/** Builds the nominal lattice of a pattern already in mm. */
export function buildLattice(p: PatternMm): Lattice {
  const panels: PanelInfo[] = (p.panels?.length ? p.panels : [{ id: 'bed', x: 0, y: 0, width: p.bed.width, height: p.bed.height }]).map((q) => ({
    id: q.id, x: q.x, y: q.y, width: q.width, height: q.height, cx: q.x + q.width / 2, cy: q.y + q.height / 2, implicit: !p.panels?.length,
  }));
  const channels = p.channels ?? [];
  const positions: NominalPosition[] = [];
  const families: FamilyInfo[] = p.families.map((f, fi) => {
    const node = new Int32Array(f.count.x * f.count.y).fill(-1);
    for (let row = 0; row < f.count.y; row++)
      for (let col = 0; col < f.count.x; col++) {
        const x = f.origin.x + col * f.pitch.x, y = f.origin.y + row * f.pitch.y;
        if (channels.some((c) => inside(c, x, y))) continue;
        let panel = panels.findIndex((q) => inside(q, x, y, 1e-9));
        if (panel < 0) {
          let best = Infinity;
          panels.forEach((q, i) => { const d = distToRect(q, x, y); if (d < best) { best = d; panel = i; } });
        }
        node[row * f.count.x + col] = positions.length;
        positions.push({ family: fi, col, row, x, y, panel, label: positionLabel(f, col, row) });
      }
    return { id: f.id, family: f, toleranceMm: radialToleranceMm(f.fit, f.holeDiameter), node };
  });
  return { positions, panels, families, pattern: p };
}

/** Nearest node of family `fi` to bed point (x, y): position index (−1 if none/excluded) and its distance, mm. */
export function nearestNode(l: Lattice, fi: number, x: number, y: number): { pos: number; dist: number } {
  const fam = l.families[fi]!, f = fam.family;
  const col = Math.round((x - f.origin.x) / f.pitch.x), row = Math.round((y - f.origin.y) / f.pitch.y);
  if (!(col >= 0 && row >= 0 && col < f.count.x && row < f.count.y)) return { pos: -1, dist: Infinity }; // NaN too
  const pos = fam.node[row * f.count.x + col]!;
  if (pos < 0) return { pos: -1, dist: Infinity };
  const q = l.positions[pos]!;
  return { pos, dist: Math.hypot(x - q.x, y - q.y) };
}

/** Panels that touch: pairs (a, b) with a shared edge (gap ≤ `gapMm`) and an overlap along it, and the seam midpoint. */
export function neighbourPanels(panels: PanelInfo[], gapMm = 5): { a: number; b: number; x: number; y: number }[] {
  const out: { a: number; b: number; x: number; y: number }[] = [];
  for (let i = 0; i < panels.length; i++)
    for (let j = i + 1; j < panels.length; j++) {
      const A = panels[i]!, B = panels[j]!;
      const ox0 = Math.max(A.x, B.x), ox1 = Math.min(A.x + A.width, B.x + B.width);
      const oy0 = Math.max(A.y, B.y), oy1 = Math.min(A.y + A.height, B.y + B.height);
      const gapY = Math.max(B.y - (A.y + A.height), A.y - (B.y + B.height));
      const gapX = Math.max(B.x - (A.x + A.width), A.x - (B.x + B.width));
      if (ox1 > ox0 && Math.abs(gapY) <= gapMm) out.push({ a: i, b: j, x: (ox0 + ox1) / 2, y: gapY >= 0 ? (B.y > A.y ? A.y + A.height : B.y + B.height) : (oy0 + oy1) / 2 });
      else if (oy1 > oy0 && Math.abs(gapX) <= gapMm) out.push({ a: i, b: j, x: B.x > A.x ? A.x + A.width : B.x + B.width, y: (oy0 + oy1) / 2 });
    }
  return out;
}
