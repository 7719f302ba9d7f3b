/**
 * Comparison of two checks of one bed (before → after, e.g. around a rebuild), in the bed frame (mm).
 *
 * For each nominal position present in both reports: the change of its deviation (after − before). A change
 * is marked significant when its length exceeds the expanded uncertainty U = k·√(u_before² + u_after²) with
 * coverage factor k = 2 (about 95 % for a normal distribution; JCGM 100:2008 "GUM", §6.2–6.3). The same rule
 * is applied to panel offsets. Positions matched in only one report are listed with `change: null`.
 */
import type { Report } from '@/lib/geometry/contract';

/** Coverage factor for "larger than the uncertainty" (GUM, k = 2). */
export const COVERAGE_K = 2;

export interface Deviation { dx: number; dy: number; r: number }

export interface PositionChange {
  family: string;
  col: number;
  row: number;
  label: string;
  panel: string | null;
  before: Deviation | null;
  after: Deviation | null;
  /** after − before, mm; null unless matched in both. */
  change: Deviation | null;
  /** Expanded uncertainty of the change, mm (k = 2), or null when either side has none. */
  expandedUncertaintyMm: number | null;
  /** True / false when decidable; null when an uncertainty or a side is missing. */
  significant: boolean | null;
  verdictBefore: string | null;
  verdictAfter: string | null;
}

export interface PanelChange {
  id: string;
  before: { dx: number; dy: number; rotationDeg: number } | null;
  after: { dx: number; dy: number; rotationDeg: number } | null;
  change: { dx: number; dy: number; r: number; rotationDeg: number } | null;
  expandedUncertaintyMm: number | null;
  significant: boolean | null;
}

export interface Comparison {
  positions: PositionChange[];
  panels: PanelChange[];
  summary: {
    before: { rmsMm: number; maxMm: number; out: number; verdict: string };
    after: { rmsMm: number; maxMm: number; out: number; verdict: string };
    /** Positions whose deviation shrank / grew by more than the expanded uncertainty. */
    improved: number;
    worsened: number;
    significant: number;
    /** Positions present in both reports. */
    common: number;
    coverageK: number;
  };
}

const keyOf = (p: { family: string; col: number; row: number }) => `${p.family}\u0000${p.col}\u0000${p.row}`;

function expanded(a: number | null | undefined, b: number | null | undefined): number | null {
  if (a == null || b == null) return null;
  return COVERAGE_K * Math.hypot(a, b);
}

/** Compares `before` with `after` (see the module header). Pure. */
export function compareReports(before: Report, after: Report): Comparison {
  const afterByKey = new Map(after.positions.map((p) => [keyOf(p), p]));
  const seen = new Set<string>();
  const positions: PositionChange[] = [];
  let improved = 0;
  let worsened = 0;
  let significantCount = 0;
  let common = 0;
  for (const b of before.positions) {
    const k = keyOf(b);
    const a = afterByKey.get(k);
    if (!a) continue;
    seen.add(k);
    common++;
    const change = b.deviation && a.deviation
      ? { dx: a.deviation.dx - b.deviation.dx, dy: a.deviation.dy - b.deviation.dy, r: Math.hypot(a.deviation.dx - b.deviation.dx, a.deviation.dy - b.deviation.dy) }
      : null;
    const U = change ? expanded(b.uncertaintyMm, a.uncertaintyMm) : null;
    const significant = change && U !== null ? change.r > U : null;
    if (significant && b.deviation && a.deviation) {
      significantCount++;
      if (a.deviation.r < b.deviation.r) improved++;
      else if (a.deviation.r > b.deviation.r) worsened++;
    }
    positions.push({
      family: b.family, col: b.col, row: b.row, label: b.label, panel: a.panel ?? b.panel,
      before: b.deviation, after: a.deviation, change, expandedUncertaintyMm: U, significant,
      verdictBefore: b.verdict, verdictAfter: a.verdict,
    });
  }
  for (const a of after.positions) {
    if (seen.has(keyOf(a))) continue;
    positions.push({
      family: a.family, col: a.col, row: a.row, label: a.label, panel: a.panel, before: null, after: a.deviation, change: null,
      expandedUncertaintyMm: null, significant: null, verdictBefore: null, verdictAfter: a.verdict,
    });
  }

  const afterPanels = new Map(after.panels.map((p) => [p.id, p]));
  const panelIds = [...new Set([...before.panels.map((p) => p.id), ...after.panels.map((p) => p.id)])];
  const beforePanels = new Map(before.panels.map((p) => [p.id, p]));
  const panels: PanelChange[] = panelIds.map((id) => {
    const b = beforePanels.get(id);
    const a = afterPanels.get(id);
    const change = a && b
      ? { dx: a.dx - b.dx, dy: a.dy - b.dy, r: Math.hypot(a.dx - b.dx, a.dy - b.dy), rotationDeg: a.rotationDeg - b.rotationDeg }
      : null;
    const U = change ? expanded(b?.uncertaintyMm, a?.uncertaintyMm) : null;
    return {
      id,
      before: b ? { dx: b.dx, dy: b.dy, rotationDeg: b.rotationDeg } : null,
      after: a ? { dx: a.dx, dy: a.dy, rotationDeg: a.rotationDeg } : null,
      change,
      expandedUncertaintyMm: U,
      significant: change && U !== null ? change.r > U : null,
    };
  });

  const side = (r: Report) => ({ rmsMm: r.summary.rmsMm, maxMm: r.summary.maxMm, out: r.summary.out, verdict: r.summary.verdict });
  return {
    positions,
    panels,
    summary: { before: side(before), after: side(after), improved, worsened, significant: significantCount, common, coverageK: COVERAGE_K },
  };
}
