/**
 * Shared geometry of the deviation map (PDF report and the mail image): the bed outline and panels in the bed
 * frame (mm, origin front-left, +X right, +Y away from the operator), the spacing that sets the arrow
 * exaggeration, and the verdict colours (RGB in [0, 1]).
 */
import { MM_PER_IN, type Report, type ReportPosition, type Verdict } from '@/lib/geometry/contract';

export const VERDICT_RGB: Record<Verdict, [number, number, number]> = {
  in: [0.18, 0.44, 0.37],
  marginal: [0.72, 0.5, 0.0],
  out: [0.68, 0.2, 0.17],
  missing: [0.55, 0.57, 0.56],
};

export interface MapGeometry {
  widthMm: number;
  heightMm: number;
  originX: number;
  originY: number;
  panels: { id: string; x: number; y: number; width: number; height: number }[];
}

/** Bed outline and panels from the report's pattern when it carries them, else the positions' bounds. */
export function mapGeometry(report: Report): MapGeometry {
  const p = report.pattern as Record<string, unknown>;
  const bed = p.bed as { width?: unknown; height?: unknown } | undefined;
  const panelsRaw = Array.isArray(p.panels) ? (p.panels as Record<string, unknown>[]) : [];
  const panels = panelsRaw
    .filter((q) => typeof q.id === 'string' && [q.x, q.y, q.width, q.height].every((v) => typeof v === 'number' && Number.isFinite(v)))
    .map((q) => ({ id: q.id as string, x: q.x as number, y: q.y as number, width: q.width as number, height: q.height as number }));
  const inMm = p.units !== 'in';
  if (bed && typeof bed.width === 'number' && typeof bed.height === 'number' && bed.width > 0 && bed.height > 0) {
    const k = inMm ? 1 : MM_PER_IN;
    return { widthMm: bed.width * k, heightMm: bed.height * k, originX: 0, originY: 0, panels: panels.map((q) => ({ ...q, x: q.x * k, y: q.y * k, width: q.width * k, height: q.height * k })) };
  }
  const xs = report.positions.map((q) => q.nominal.x);
  const ys = report.positions.map((q) => q.nominal.y);
  const minX = xs.length ? Math.min(...xs) : 0;
  const minY = ys.length ? Math.min(...ys) : 0;
  const w = xs.length ? Math.max(...xs) - minX : 100;
  const h = ys.length ? Math.max(...ys) - minY : 100;
  const pad = Math.max(w, h, 1) * 0.05;
  return { widthMm: w + 2 * pad, heightMm: h + 2 * pad, originX: minX - pad, originY: minY - pad, panels: [] };
}

/** Smallest distance between two nominal positions of one family (mm), for the arrow scale. */
export function nearestSpacing(positions: ReportPosition[]): number {
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

