/**
 * Geometry of the deviation map, shared by every surface that draws it (the web report and shared page, the
 * comparison, the PDF and the mail image): the bed outline and panels in the bed frame (mm, origin front-left,
 * +X right, +Y away from the operator), the nearest spacing between positions (it sizes the marks and the arrow
 * scale), and the 1-2-5 rounding the scales use.
 */
import { MM_PER_IN, type Report, type ReportPosition } from '@/lib/geometry/contract';

export interface MapGeometry {
  widthMm: number;
  heightMm: number;
  originX: number;
  originY: number;
  panels: { id: string; x: number; y: number; width: number; height: number }[];
}

/** The pattern's outline a report carries for its maps (report.pattern.bed and .panels), in mm. */
export interface MapOutline {
  bed: { width: number; height: number };
  panels?: { id: string; x: number; y: number; width: number; height: number }[] | null;
}

/** The report with the bed outline and panels (mm) of the pattern it was measured against, for its maps and headline. */
export function withOutline(report: Report, outline: MapOutline | null | undefined): Report {
  if (!outline) return report;
  return {
    ...report,
    pattern: {
      name: report.pattern.name,
      units: 'mm',
      bed: { width: outline.bed.width, height: outline.bed.height },
      ...(outline.panels?.length ? { panels: outline.panels.map((q) => ({ id: q.id, x: q.x, y: q.y, width: q.width, height: q.height })) } : {}),
    },
  };
}

/** Bed outline and panels from the report's pattern when it carries them, else the positions' bounds. */
export function mapGeometry(report: Pick<Report, 'pattern' | 'positions'>): MapGeometry {
  const p = report.pattern;
  const k = p.units === 'in' ? MM_PER_IN : 1;
  const panels = (p.panels ?? []).map((q) => ({ id: q.id, x: q.x * k, y: q.y * k, width: q.width * k, height: q.height * k }));
  if (p.bed && p.bed.width > 0 && p.bed.height > 0) return { widthMm: p.bed.width * k, heightMm: p.bed.height * k, originX: 0, originY: 0, panels };
  const xs = report.positions.map((q) => q.nominal.x);
  const ys = report.positions.map((q) => q.nominal.y);
  const minX = xs.length ? Math.min(...xs) : 0;
  const minY = ys.length ? Math.min(...ys) : 0;
  const w = xs.length ? Math.max(...xs) - minX : 100;
  const h = ys.length ? Math.max(...ys) - minY : 100;
  const pad = Math.max(w, h, 1) * 0.05;
  return { widthMm: w + 2 * pad, heightMm: h + 2 * pad, originX: minX - pad, originY: minY - pad, panels: [] };
}

/** Smallest distance between two nominal positions of one family (mm), for the mark size and the arrow scale. */
export function nearestSpacing(positions: readonly ReportPosition[]): number {
  const byFamily = new Map<string, ReportPosition[]>();
  for (const q of positions) byFamily.set(q.family, [...(byFamily.get(q.family) ?? []), q]);
  let best = Infinity;
  for (const list of byFamily.values()) {
    const sample = list.slice(0, 200);
    for (const a of sample) for (const b of list) {
      if (a === b) continue;
      const d = Math.hypot(a.nominal.x - b.nominal.x, a.nominal.y - b.nominal.y);
      if (d > 1e-9 && d < best) best = d;
    }
  }
  return Number.isFinite(best) ? best : 50;
}

/** The largest of 1, 2 or 5 times a power of ten not above x (1 for x ≤ 0). */
export function niceFactor(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 1;
  const e = Math.pow(10, Math.floor(Math.log10(x)));
  const m = x / e;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * e;
}

/**
 * A mark's radius on the map, mm of bed: a sixth of the spacing between neighbours, at most a sixtieth of the
 * bed's larger side, at least 0.5 mm. Every surface draws it at this size times its own scale.
 */
export function markRadiusMm(g: Pick<MapGeometry, 'widthMm' | 'heightMm'>, spacingMm: number): number {
  return Math.max(0.5, Math.min(spacingMm * 0.17, Math.max(g.widthMm, g.heightMm) / 60));
}
