/**
 * The pattern's mistake finder: a pure function over a Pattern that lists what cannot be right on a real bed —
 * holes that overlap each other, a T-track channel, a panel edge or the bed's edge, panels or channels that
 * leave the bed, panels that overlap, and fits that cannot hold (an unknown fastener, a pin that does not clear
 * its hole). The bed setup page draws every finding at once; nothing here touches the DOM or the network.
 *
 * Frame: bed frame, millimetres after `patternToMm` (origin front-left, +X right, +Y away from the operator).
 * Every `at`, `overlapMm` and rect in a finding is in that frame and unit; messages quote lengths in the
 * pattern's own units.
 *
 * A hole whose centre lies inside a channel is not a mistake: the measurement core leaves such positions out
 * of the lattice (a channel routed through a grid removes those holes). It is reported as a `notice`. A hole
 * whose rim only reaches into a channel is a mistake (the channel's wall would break into the hole).
 */
import { MM_PER_IN, type Pattern, type Rect } from '@/lib/geometry/contract';
import { radialToleranceMm } from '@/lib/geometry/fits';
import { positionLabel } from '@/lib/geometry/labels';
import { patternToMm } from '@/lib/geometry/units';

export type LintCode =
  | 'family-self-overlap'
  | 'hole-overlap'
  | 'hole-channel'
  | 'hole-in-channel'
  | 'hole-panel-edge'
  | 'hole-off-panels'
  | 'hole-bed-edge'
  | 'panel-overlap'
  | 'panel-off-bed'
  | 'channel-off-bed'
  | 'fit';

export type LintSeverity = 'mistake' | 'notice';

/** One hole of the pattern: family index and lattice node (0-based), its label and centre (bed frame, mm). */
export interface LintHole { family: number; col: number; row: number; label: string; xMm: number; yMm: number }

export interface LintFinding {
  code: LintCode;
  severity: LintSeverity;
  /** What is wrong, in words, with lengths in the pattern's units. */
  message: string;
  /** Where to point on the drawing (bed frame, mm). */
  atMm: { x: number; y: number };
  /** The holes concerned (at most two per finding; a family-wide finding names its first pair). */
  holes: LintHole[];
  /** Index of the panel or channel concerned, when there is one. */
  panel?: number;
  channel?: number;
  /** How far the two shapes overlap, mm (positive), when the finding is an overlap. */
  overlapMm?: number;
}

export interface LintResult {
  findings: LintFinding[];
  /** Mistakes found in total (the list keeps at most `limit` of each code). */
  mistakes: number;
  notices: number;
  /** Findings not listed because a code reached the limit, by code. */
  omitted: Partial<Record<LintCode, number>>;
  /** `family:col:row` of every hole named in any mistake (for the drawing, complete even past the limit). */
  flagged: Set<string>;
}

/** Lengths closer than this count as touching, not overlapping, mm. */
export const LINT_EPS_MM = 1e-6;

/** Key of a hole in `LintResult.flagged`. */
export const holeKey = (family: number, col: number, row: number): string => `${family}:${col}:${row}`;

/** Distance from a point to a rectangle (0 inside), same units as both. */
export function distToRect(r: Rect, x: number, y: number): number {
  const dx = Math.max(r.x - x, 0, x - (r.x + r.width));
  const dy = Math.max(r.y - y, 0, y - (r.y + r.height));
  return Math.hypot(dx, dy);
}

/** Distance from a point inside a rectangle to its nearest edge (negative outside), same units. */
export function insetInRect(r: Rect, x: number, y: number): number {
  return Math.min(x - r.x, r.x + r.width - x, y - r.y, r.y + r.height - y);
}

const rectsOverlap = (a: Rect, b: Rect, eps: number) =>
  Math.min(a.x + a.width, b.x + b.width) - Math.max(a.x, b.x) > eps && Math.min(a.y + a.height, b.y + b.height) - Math.max(a.y, b.y) > eps;

const rectInside = (inner: Rect, outer: Rect, eps: number) =>
  inner.x >= outer.x - eps && inner.y >= outer.y - eps && inner.x + inner.width <= outer.x + outer.width + eps && inner.y + inner.height <= outer.y + outer.height + eps;

/**
 * Finds the mistakes of a pattern (see the module header). `limit` caps the listed findings per code (all are
 * still counted and flagged). Runs in about O(positions × (panels + channels)) plus a grid hash for the
 * hole pairs, so it is quick enough to run on every keystroke of the setup form.
 */
export function lintPattern(pattern: Pattern, opts: { limit?: number } = {}): LintResult {
  const limit = opts.limit ?? 50;
  const p = patternToMm(pattern);
  const unit = pattern.units;
  const len = (mm: number) => (unit === 'in' ? `${+(mm / MM_PER_IN).toFixed(3)} in` : `${+mm.toFixed(2)} mm`);
  const findings: LintFinding[] = [];
  const counts: Partial<Record<LintCode, number>> = {};
  const omitted: Partial<Record<LintCode, number>> = {};
  const flagged = new Set<string>();
  let mistakes = 0, notices = 0;

  const add = (f: LintFinding) => {
    if (f.severity === 'mistake') {
      mistakes++;
      for (const h of f.holes) flagged.add(holeKey(h.family, h.col, h.row));
    } else notices++;
    const n = (counts[f.code] = (counts[f.code] ?? 0) + 1);
    if (n <= limit) findings.push(f);
    else omitted[f.code] = (omitted[f.code] ?? 0) + 1;
  };
  /** Flags a hole without listing a finding (family-wide findings flag every member). */
  const flagOnly = (h: LintHole) => flagged.add(holeKey(h.family, h.col, h.row));

  const bed: Rect = { x: 0, y: 0, width: p.bed.width, height: p.bed.height };
  const panels = p.panels ?? [];
  const channels = p.channels ?? [];

  // Fits that cannot hold.
  for (const f of p.families) {
    try {
      radialToleranceMm(f.fit, f.holeDiameter);
    } catch (e) {
      add({ code: 'fit', severity: 'mistake', message: `${f.id}: ${(e as Error).message}`, atMm: { x: f.origin.x, y: f.origin.y }, holes: [] });
    }
  }

  // Panels and channels against the bed and each other.
  panels.forEach((q, i) => {
    if (!rectInside(q, bed, LINT_EPS_MM)) add({ code: 'panel-off-bed', severity: 'mistake', message: `Panel ${q.id} reaches past the bed's edge.`, atMm: { x: q.x + q.width / 2, y: q.y + q.height / 2 }, holes: [], panel: i });
    for (let j = i + 1; j < panels.length; j++) {
      const r = panels[j]!;
      if (rectsOverlap(q, r, LINT_EPS_MM)) {
        const x = (Math.max(q.x, r.x) + Math.min(q.x + q.width, r.x + r.width)) / 2, y = (Math.max(q.y, r.y) + Math.min(q.y + q.height, r.y + r.height)) / 2;
        add({ code: 'panel-overlap', severity: 'mistake', message: `Panels ${q.id} and ${r.id} overlap.`, atMm: { x, y }, holes: [], panel: i });
      }
    }
  });
  channels.forEach((c, i) => {
    if (!rectInside(c, bed, LINT_EPS_MM)) add({ code: 'channel-off-bed', severity: 'mistake', message: `Channel ${i + 1} reaches past the bed's edge.`, atMm: { x: c.x + c.width / 2, y: c.y + c.height / 2 }, holes: [], channel: i });
  });

  // Every hole, with its radius.
  type H = LintHole & { r: number };
  const holes: H[] = [];
  p.families.forEach((f, fi) => {
    for (let row = 0; row < f.count.y; row++)
      for (let col = 0; col < f.count.x; col++)
        holes.push({ family: fi, col, row, label: positionLabel(f, col, row), xMm: f.origin.x + col * f.pitch.x, yMm: f.origin.y + row * f.pitch.y, r: f.holeDiameter / 2 });
  });
  const pub = (h: H): LintHole => ({ family: h.family, col: h.col, row: h.row, label: h.label, xMm: h.xMm, yMm: h.yMm });

  // Holes of one family overlapping their neighbours: one finding per family, every member flagged.
  p.families.forEach((f, fi) => {
    const d = f.holeDiameter;
    const alongX = f.count.x > 1 && f.pitch.x < d - LINT_EPS_MM;
    const alongY = f.count.y > 1 && f.pitch.y < d - LINT_EPS_MM;
    const diag = f.count.x > 1 && f.count.y > 1 && Math.hypot(f.pitch.x, f.pitch.y) < d - LINT_EPS_MM;
    if (!alongX && !alongY && !diag) return;
    const step = alongX ? { dc: 1, dr: 0, pitch: f.pitch.x } : alongY ? { dc: 0, dr: 1, pitch: f.pitch.y } : { dc: 1, dr: 1, pitch: Math.hypot(f.pitch.x, f.pitch.y) };
    const a = holes.find((h) => h.family === fi && h.col === 0 && h.row === 0)!;
    const b = holes.find((h) => h.family === fi && h.col === step.dc && h.row === step.dr)!;
    for (const h of holes) if (h.family === fi) flagOnly(h);
    add({
      code: 'family-self-overlap', severity: 'mistake',
      message: `${f.id}: holes ${len(d)} across on a ${len(step.pitch)} pitch overlap their neighbours (for example ${a.label} and ${b.label}).`,
      atMm: { x: (a.xMm + b.xMm) / 2, y: (a.yMm + b.yMm) / 2 }, holes: [pub(a), pub(b)], overlapMm: d - step.pitch,
    });
  });

  // Holes of different families overlapping: grid hash with cells as large as the largest hole.
  if (p.families.length > 1 && holes.length > 1) {
    const cell = Math.max(...p.families.map((f) => f.holeDiameter)) || 1;
    const grid = new Map<string, number[]>();
    const keyOf = (x: number, y: number) => `${Math.floor(x / cell)},${Math.floor(y / cell)}`;
    holes.forEach((h, i) => {
      const k = keyOf(h.xMm, h.yMm);
      const list = grid.get(k);
      if (list) list.push(i);
      else grid.set(k, [i]);
    });
    holes.forEach((h, i) => {
      const cx = Math.floor(h.xMm / cell), cy = Math.floor(h.yMm / cell);
      for (let gx = cx - 1; gx <= cx + 1; gx++)
        for (let gy = cy - 1; gy <= cy + 1; gy++)
          for (const j of grid.get(`${gx},${gy}`) ?? []) {
            if (j <= i) continue;
            const o = holes[j]!;
            if (o.family === h.family) continue; // same family: handled above, once per family
            const overlap = h.r + o.r - Math.hypot(h.xMm - o.xMm, h.yMm - o.yMm);
            if (overlap > LINT_EPS_MM)
              add({ code: 'hole-overlap', severity: 'mistake', message: `${h.label} and ${o.label} overlap by ${len(overlap)}.`, atMm: { x: (h.xMm + o.xMm) / 2, y: (h.yMm + o.yMm) / 2 }, holes: [pub(h), pub(o)], overlapMm: overlap });
          }
    });
  }

  for (const h of holes) {
    const at = { x: h.xMm, y: h.yMm };
    // The bed's edge.
    const inset = insetInRect(bed, h.xMm, h.yMm);
    if (inset < h.r - LINT_EPS_MM) {
      add({ code: 'hole-bed-edge', severity: 'mistake', message: inset < 0 ? `${h.label} lies off the bed.` : `${h.label} breaks through the bed's edge (${len(inset)} from it, hole ${len(2 * h.r)} across).`, atMm: at, holes: [pub(h)], overlapMm: h.r - inset });
      continue; // a hole off the bed would also cross every panel and channel test; one finding is enough
    }
    // Channels.
    let inChannel = false;
    channels.forEach((c, ci) => {
      const dist = distToRect(c, h.xMm, h.yMm);
      if (dist === 0) {
        inChannel = true;
        add({ code: 'hole-in-channel', severity: 'notice', message: `${h.label} falls inside channel ${ci + 1} and is left out of the check.`, atMm: at, holes: [pub(h)], channel: ci });
      } else if (dist < h.r - LINT_EPS_MM) {
        add({ code: 'hole-channel', severity: 'mistake', message: `${h.label} cuts into channel ${ci + 1} (its rim reaches ${len(h.r - dist)} into it).`, atMm: at, holes: [pub(h)], channel: ci, overlapMm: h.r - dist });
      }
    });
    if (inChannel || panels.length === 0) continue;
    // Panels: the hole must sit wholly inside one panel, clear of its edges.
    let home = -1;
    let bestInset = -Infinity;
    panels.forEach((q, qi) => {
      const s = insetInRect(q, h.xMm, h.yMm);
      if (s > bestInset) { bestInset = s; home = qi; }
    });
    if (bestInset < 0) {
      add({ code: 'hole-off-panels', severity: 'mistake', message: `${h.label} is on no panel.`, atMm: at, holes: [pub(h)] });
    } else if (bestInset < h.r - LINT_EPS_MM) {
      const q = panels[home]!;
      add({ code: 'hole-panel-edge', severity: 'mistake', message: `${h.label} crosses the edge of panel ${q.id} (${len(bestInset)} from it, hole ${len(2 * h.r)} across).`, atMm: at, holes: [pub(h)], panel: home, overlapMm: h.r - bestInset });
    }
  }

  return { findings, mistakes, notices, omitted, flagged };
}
