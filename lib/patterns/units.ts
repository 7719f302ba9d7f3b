/**
 * Switching a pattern between millimetres and inches for the setup form. Every length of the pattern (bed,
 * hole diameters, origins, pitches, panels, channels, a pin's diameter) is scaled by 25.4 mm/in (exact, by
 * definition); a `toleranceMm` fit stays in millimetres as its name says. Bed frame either way: origin
 * front-left, +X right, +Y away from the operator.
 */
import { MM_PER_IN, type FitSpec, type Pattern } from '@/lib/geometry/contract';
import { patternToMm } from '@/lib/geometry/units';

/** Rounds away binary noise from a unit conversion: to 1 nm in mm, to 1e-9 in (25 pm) in inches. */
const cleanMm = (v: number): number => Math.round(v * 1e6) / 1e6;
const cleanIn = (v: number): number => Math.round(v * 1e9) / 1e9;

/** The same pattern in `units` ('mm' or 'in'); the pattern itself is not changed. */
export function convertPattern(p: Pattern, units: 'mm' | 'in'): Pattern {
  if (p.units === units) return p;
  const { panels: _p, channels: _c, ...rest } = patternToMm(p);
  const mm = { ...rest, ...(_p ? { panels: _p } : {}), ...(_c ? { channels: _c } : {}) };
  if (units === 'mm') {
    const k = cleanMm;
    return {
      ...mm,
      bed: { width: k(mm.bed.width), height: k(mm.bed.height) },
      families: mm.families.map((f) => ({ ...f, holeDiameter: k(f.holeDiameter), origin: { x: k(f.origin.x), y: k(f.origin.y) }, pitch: { x: k(f.pitch.x), y: k(f.pitch.y) }, fit: 'pinDiameter' in f.fit ? { pinDiameter: k(f.fit.pinDiameter) } : f.fit })),
      ...(mm.panels ? { panels: mm.panels.map((q) => ({ ...q, x: k(q.x), y: k(q.y), width: k(q.width), height: k(q.height) })) } : {}),
      ...(mm.channels ? { channels: mm.channels.map((q) => ({ x: k(q.x), y: k(q.y), width: k(q.width), height: k(q.height) })) } : {}),
    };
  }
  const k = (v: number) => cleanIn(v / MM_PER_IN);
  const fit = (f: FitSpec): FitSpec => ('pinDiameter' in f ? { pinDiameter: k(f.pinDiameter) } : f);
  return {
    ...mm,
    units: 'in',
    bed: { width: k(mm.bed.width), height: k(mm.bed.height) },
    families: mm.families.map((f) => ({ ...f, holeDiameter: k(f.holeDiameter), origin: { x: k(f.origin.x), y: k(f.origin.y) }, pitch: { x: k(f.pitch.x), y: k(f.pitch.y) }, fit: fit(f.fit) })),
    ...(mm.panels ? { panels: mm.panels.map((q) => ({ ...q, x: k(q.x), y: k(q.y), width: k(q.width), height: k(q.height) })) } : {}),
    ...(mm.channels ? { channels: mm.channels.map((q) => ({ x: k(q.x), y: k(q.y), width: k(q.width), height: k(q.height) })) } : {}),
  };
}

/** Millimetres → the given unit. */
export const fromMm = (mm: number, units: 'mm' | 'in'): number => (units === 'in' ? mm / MM_PER_IN : mm);
/** The given unit → millimetres. */
export const toMm = (v: number, units: 'mm' | 'in'): number => (units === 'in' ? v * MM_PER_IN : v);

/** A length for people: "12.5 mm" or "0.492 in". */
export function formatLength(mm: number, units: 'mm' | 'in', digits?: number): string {
  return units === 'in' ? `${+(mm / MM_PER_IN).toFixed(digits ?? 3)} in` : `${+mm.toFixed(digits ?? 1)} mm`;
}
