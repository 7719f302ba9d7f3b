/**
 * Units at the edge: a pattern in inches is converted to millimetres once, here. After `patternToMm` every
 * length in the core is millimetres in the bed frame (origin front-left, +X right, +Y away from the operator).
 */
import { MM_PER_IN, type FitSpec, type Pattern } from './contract';

/** A pattern whose lengths are all millimetres. */
export type PatternMm = Pattern & { units: 'mm' };

/** Inches → millimetres. */
export const inToMm = (inches: number): number => inches * MM_PER_IN;
/** Millimetres → inches. */
export const mmToIn = (mm: number): number => mm / MM_PER_IN;

/** Returns the pattern with every length in millimetres (`toleranceMm` is already mm and is kept). */
export function patternToMm(p: Pattern): PatternMm {
  if (p.units === 'mm') return p as PatternMm;
  const k = MM_PER_IN;
  const v = (q: { x: number; y: number }) => ({ x: q.x * k, y: q.y * k });
  const fit = (f: FitSpec): FitSpec => ('pinDiameter' in f ? { pinDiameter: f.pinDiameter * k } : f);
  return {
    ...p,
    units: 'mm',
    bed: { width: p.bed.width * k, height: p.bed.height * k },
    families: p.families.map((f) => ({ ...f, holeDiameter: f.holeDiameter * k, origin: v(f.origin), pitch: v(f.pitch), fit: fit(f.fit) })),
    panels: p.panels?.map((q) => ({ ...q, x: q.x * k, y: q.y * k, width: q.width * k, height: q.height * k })),
    channels: p.channels?.map((q) => ({ x: q.x * k, y: q.y * k, width: q.width * k, height: q.height * k })),
  };
}
