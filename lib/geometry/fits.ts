/**
 * Fit tables and radial tolerance. A position's radial tolerance is how far (mm, in the bed plane) a hole's
 * centre may sit from nominal and still take what goes in it: (clearance hole − fastener or pin diameter) / 2.
 *
 * Tables are data, written once; each row names its source. Values marked "from memory" were entered from
 * memory of the standard and should be checked against a copy of it before being relied on.
 */
import { MM_PER_IN, type FitSpec } from './contract';

export type MetricClass = 'fine' | 'medium' | 'coarse';
export type InchClass = 'close' | 'normal' | 'loose';

export interface ClearanceRow {
  /** Fastener designations this row answers to, e.g. ["M6"] or ["1/4-20", "1/4-28", "1/4"]. */
  names: string[];
  /** Nominal (major) diameter of the fastener, mm. */
  nominalMm: number;
  /** Clearance hole diameters by class, mm. */
  holeMm: Partial<Record<MetricClass | InchClass, number>>;
  source: string;
}

const ISO273 = 'ISO 273:1979, clearance holes for bolts and screws, series fine/medium/coarse';
const ISO273_MEM = `${ISO273} (from memory)`;

/** ISO 273 metric clearance holes (mm). */
export const ISO_273: ClearanceRow[] = [
  { names: ['M3'], nominalMm: 3, holeMm: { fine: 3.2, medium: 3.4, coarse: 3.6 }, source: ISO273_MEM },
  { names: ['M4'], nominalMm: 4, holeMm: { fine: 4.3, medium: 4.5, coarse: 4.8 }, source: ISO273_MEM },
  { names: ['M5'], nominalMm: 5, holeMm: { fine: 5.3, medium: 5.5, coarse: 5.8 }, source: ISO273_MEM },
  { names: ['M6'], nominalMm: 6, holeMm: { fine: 6.4, medium: 6.6, coarse: 7.0 }, source: ISO273 },
  { names: ['M8'], nominalMm: 8, holeMm: { fine: 8.4, medium: 9.0, coarse: 10.0 }, source: ISO273_MEM },
  { names: ['M10'], nominalMm: 10, holeMm: { fine: 10.5, medium: 11.0, coarse: 12.0 }, source: ISO273_MEM },
  { names: ['M12'], nominalMm: 12, holeMm: { fine: 13.0, medium: 13.5, coarse: 14.5 }, source: ISO273_MEM },
];

const B1828 = 'ASME B18.2.8, clearance holes for bolts, screws and studs, close/normal/loose fit';
const B1828_MEM = `${B1828} (from memory)`;
const inch = (close: number, normal: number, loose: number) => ({ close: close * MM_PER_IN, normal: normal * MM_PER_IN, loose: loose * MM_PER_IN });

/** ASME B18.2.8 inch clearance holes (entered in inches, stored mm). */
export const ASME_B18_2_8: ClearanceRow[] = [
  { names: ['#10-24', '#10-32', '#10'], nominalMm: 0.19 * MM_PER_IN, holeMm: inch(0.201, 0.213, 0.228), source: B1828_MEM },
  { names: ['1/4-20', '1/4-28', '1/4'], nominalMm: 0.25 * MM_PER_IN, holeMm: inch(0.266, 0.281, 0.297), source: B1828 },
  { names: ['5/16-18', '5/16-24', '5/16'], nominalMm: 0.3125 * MM_PER_IN, holeMm: inch(0.332, 0.344, 0.358), source: B1828_MEM },
  { names: ['3/8-16', '3/8-24', '3/8'], nominalMm: 0.375 * MM_PER_IN, holeMm: inch(0.397, 0.406, 0.431), source: B1828_MEM },
  { names: ['1/2-13', '1/2-20', '1/2'], nominalMm: 0.5 * MM_PER_IN, holeMm: inch(0.531, 0.562, 0.594), source: B1828_MEM },
];

/** Fastener designations the tables know. */
export const FASTENERS: string[] = [...ISO_273, ...ASME_B18_2_8].flatMap((r) => r.names);

/** Finds a table row for a fastener name (case and spaces ignored), or undefined. */
export function clearanceRow(fastener: string): ClearanceRow | undefined {
  const key = fastener.replace(/\s+/g, '').toUpperCase();
  return [...ISO_273, ...ASME_B18_2_8].find((r) => r.names.some((n) => n.toUpperCase() === key));
}

/** Clearance hole diameter (mm) for a fastener and class; throws with a clear message if unknown. */
export function clearanceHoleMm(fastener: string, cls: MetricClass | InchClass): number {
  const row = clearanceRow(fastener);
  if (!row) throw new RangeError(`unknown fastener "${fastener}" (known: ${FASTENERS.join(', ')})`);
  const d = row.holeMm[cls];
  if (d === undefined) {
    const classes = Object.keys(row.holeMm).join('/');
    throw new RangeError(`clearance class "${cls}" does not apply to ${fastener} (use ${classes})`);
  }
  return d;
}

/**
 * Radial tolerance (mm) of a family's fit. `holeDiameterMm` is the family's hole, used for a pin fit;
 * `pinDiameter` in a FitSpec must already be mm (patternToMm converts it).
 */
export function radialToleranceMm(fit: FitSpec, holeDiameterMm: number): number {
  if ('toleranceMm' in fit) return fit.toleranceMm;
  if ('pinDiameter' in fit) {
    const t = (holeDiameterMm - fit.pinDiameter) / 2;
    if (!(t > 0)) throw new RangeError(`pin diameter ${fit.pinDiameter} mm does not clear the ${holeDiameterMm} mm hole`);
    return t;
  }
  const row = clearanceRow(fit.fastener);
  if (!row) throw new RangeError(`unknown fastener "${fit.fastener}" (known: ${FASTENERS.join(', ')})`);
  return (clearanceHoleMm(fit.fastener, fit.clearance) - row.nominalMm) / 2;
}

/** ISO 286-2 limit deviations (µm) for a few tolerance classes, by nominal size range (mm, lower < d ≤ upper). */
export interface Iso286Row { cls: string; overMm: number; upToMm: number; upperUm: number; lowerUm: number; source: string }
const ISO286 = 'ISO 286-2:2010, tables of limit deviations';
export const ISO_286_2: Iso286Row[] = [
  { cls: 'H7', overMm: 10, upToMm: 18, upperUm: 18, lowerUm: 0, source: `${ISO286} (from memory)` },
  { cls: 'H7', overMm: 18, upToMm: 30, upperUm: 21, lowerUm: 0, source: ISO286 },
  { cls: 'H7', overMm: 30, upToMm: 50, upperUm: 25, lowerUm: 0, source: `${ISO286} (from memory)` },
  { cls: 'g6', overMm: 10, upToMm: 18, upperUm: -6, lowerUm: -17, source: `${ISO286} (from memory)` },
  { cls: 'g6', overMm: 18, upToMm: 30, upperUm: -7, lowerUm: -20, source: ISO286 },
  { cls: 'g6', overMm: 30, upToMm: 50, upperUm: -9, lowerUm: -25, source: `${ISO286} (from memory)` },
  { cls: 'h6', overMm: 18, upToMm: 30, upperUm: 0, lowerUm: -13, source: `${ISO286} (from memory)` },
];

/**
 * A pin-in-hole fit from ISO 286 classes at a nominal size: the radial clearance range (mm). The least radial
 * clearance (largest pin in the smallest hole) is the tolerance a position must hold for every pin to enter.
 */
export function iso286PinFit(holeClass: string, pinClass: string, nominalMm: number): { minRadialMm: number; maxRadialMm: number } {
  const row = (cls: string) => {
    const r = ISO_286_2.find((q) => q.cls === cls && nominalMm > q.overMm && nominalMm <= q.upToMm);
    if (!r) throw new RangeError(`no ISO 286-2 row for ${cls} at ${nominalMm} mm`);
    return r;
  };
  const h = row(holeClass), s = row(pinClass);
  return { minRadialMm: (h.lowerUm - s.upperUm) / 2000, maxRadialMm: (h.upperUm - s.lowerUm) / 2000 };
}
