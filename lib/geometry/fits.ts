/**
 * Fit tables and radial tolerance. A position's radial tolerance is how far (mm, in the bed plane) a hole's
 * centre may sit from nominal and still take what goes in it: (clearance hole − fastener or pin diameter) / 2.
 *
 * Tables are data, written once. Each row names its standard (`source`) and either the published copies of the
 * table its values were checked against (`readIn`) or `fromMemory: true` when no copy was found; the report's
 * method note says which (`fitTablesNote`). Clearance holes are the table's smallest hole (the drill size).
 */
import { MM_PER_IN, type FitSpec } from './contract';

export type MetricClass = 'fine' | 'medium' | 'coarse';
export type InchClass = 'close' | 'normal' | 'loose';

/** Where a table row's values come from: its standard, and the copies read or "from memory". */
export type RowProvenance =
  | { /** The standard and table. */ source: string; /** Published copies the values were checked against. */ readIn: string[]; fromMemory?: never }
  | { source: string; /** No copy of the table was found: the values were entered from memory. */ fromMemory: true; readIn?: never };

export type ClearanceRow = RowProvenance & {
  /** Fastener designations this row answers to, e.g. ["M6"] or ["1/4-20", "1/4-28", "1/4"]. */
  names: string[];
  /** Nominal (major) diameter of the fastener, mm. */
  nominalMm: number;
  /** Clearance hole diameters by class, mm. */
  holeMm: Partial<Record<MetricClass | InchClass, number>>;
};

const ISO273 = 'ISO 273:1979, clearance holes for bolts and screws, series fine (H12) / medium (H13) / coarse (H14)';
/** Copies of the ISO 273 table that agree on every row below (M3–M12). */
const ISO273_COPIES = [
  'engineeringhardware.com/?p=50 (ISO 273 / DIN 406 table, M1–M16)',
  'ficientdesign.com/clearance-hole-chart (per ISO 273, M3–M24)',
  'formulafactory.tools/reference-charts/clearance-hole-chart/ (M3–M16)',
];
const iso273 = (name: string, nominalMm: number, fine: number, medium: number, coarse: number): ClearanceRow =>
  ({ names: [name], nominalMm, holeMm: { fine, medium, coarse }, source: ISO273, readIn: ISO273_COPIES });

/** ISO 273 metric clearance holes (mm). */
export const ISO_273: ClearanceRow[] = [
  iso273('M3', 3, 3.2, 3.4, 3.6),
  iso273('M4', 4, 4.3, 4.5, 4.8),
  iso273('M5', 5, 5.3, 5.5, 5.8),
  iso273('M6', 6, 6.4, 6.6, 7.0),
  iso273('M8', 8, 8.4, 9.0, 10.0),
  iso273('M10', 10, 10.5, 11.0, 12.0),
  iso273('M12', 12, 13.0, 13.5, 14.5),
];

const B1828 = 'ASME B18.2.8-1999, clearance holes for inch bolts, screws and studs, close/normal/loose fit (minimum hole)';
/** A copy of the whole inch table (close, normal and loose, #8 to 1 in). */
const B1828_COPY = 'jandesupply.com/reference-clearance-holes.php (hole diameters per ASME B18.2.8)';
/** The table as reprinted in Machinery's Handbook: its normal-fit drills and loose-fit minimum holes were legible. */
const B1828_HANDBOOK = "Machinery's Handbook 31st ed., p. 1741, Table 1a (ANSI/ASME B18.2.8-1999 (R2017)): normal-fit drill and loose-fit minimum hole";
const inch = (close: number, normal: number, loose: number) => ({ close: close * MM_PER_IN, normal: normal * MM_PER_IN, loose: loose * MM_PER_IN });

/** ASME B18.2.8 inch clearance holes (entered in inches, stored mm). */
export const ASME_B18_2_8: ClearanceRow[] = [
  // loose 0.238 in read in the copy only (the handbook's #10 loose row was not legible)
  { names: ['#10-24', '#10-32', '#10'], nominalMm: 0.19 * MM_PER_IN, holeMm: inch(0.206, 0.221, 0.238), source: B1828, readIn: [B1828_COPY, B1828_HANDBOOK] },
  { names: ['1/4-20', '1/4-28', '1/4'], nominalMm: 0.25 * MM_PER_IN, holeMm: inch(0.266, 0.281, 0.297), source: B1828, readIn: [B1828_COPY, B1828_HANDBOOK] },
  { names: ['5/16-18', '5/16-24', '5/16'], nominalMm: 0.3125 * MM_PER_IN, holeMm: inch(0.328, 0.344, 0.359), source: B1828, readIn: [B1828_COPY, B1828_HANDBOOK] },
  { names: ['3/8-16', '3/8-24', '3/8'], nominalMm: 0.375 * MM_PER_IN, holeMm: inch(0.391, 0.406, 0.422), source: B1828, readIn: [B1828_COPY, B1828_HANDBOOK] },
  // normal 0.562 in read in the copy only (the handbook's normal-fit drills stop at 7/16)
  { names: ['1/2-13', '1/2-20', '1/2'], nominalMm: 0.5 * MM_PER_IN, holeMm: inch(0.531, 0.562, 0.609), source: B1828, readIn: [B1828_COPY, B1828_HANDBOOK] },
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
export type Iso286Row = RowProvenance & { cls: string; overMm: number; upToMm: number; upperUm: number; lowerUm: number };
const ISO286 = 'ISO 286-2:2010, tables of limit deviations';
/** Hole H7 limits as tabulated (internal measurements, 10–30 mm). */
const H7_COPY = 'deepri.com/technical/information/tech_iso_tolerances.html (H7, internal measurements)';
/** IT7 over 30–50 mm from h7 shaft tables; H places the hole's lower deviation at 0 (ISO 286-1), so H7 is 0/+IT7. */
const IT7_COPIES = ['precisemetal.in/tolerence-table.php (h7 30–50: 0/−25 µm)', 'catalog.bigdaishowa.com/view/510119233/139 (h7 30–50: 0/−0.025 mm)'];
/** Shaft g6 and h6 limits as tabulated (JIS B 0401-2, the Japanese adoption of ISO 286-2, and a bearing maker's shaft table). */
const SHAFT_COPIES = [
  'nbk1560.com technical article 08, deviations of shafts in commonly used fits (JIS B 0401-2)',
  'germany-bearing.com/article/s68/shaft-tolerances-and-resultant-fits.html (g6)',
  'docs.steelcam.org/sumitomo/tehnicheskaya-informaciya-page28 (JIS B 0401 (1999))',
];
const H6_COPIES = ['precisemetal.in/tolerence-table.php (h6 18–30: 0/−13 µm)', 'catalog.bigdaishowa.com/view/510119233/139 (h6 18–30)', SHAFT_COPIES[0]!];
export const ISO_286_2: Iso286Row[] = [
  { cls: 'H7', overMm: 10, upToMm: 18, upperUm: 18, lowerUm: 0, source: ISO286, readIn: [H7_COPY] },
  { cls: 'H7', overMm: 18, upToMm: 30, upperUm: 21, lowerUm: 0, source: ISO286, readIn: [H7_COPY] },
  { cls: 'H7', overMm: 30, upToMm: 50, upperUm: 25, lowerUm: 0, source: ISO286, readIn: IT7_COPIES },
  { cls: 'g6', overMm: 10, upToMm: 18, upperUm: -6, lowerUm: -17, source: ISO286, readIn: SHAFT_COPIES },
  { cls: 'g6', overMm: 18, upToMm: 30, upperUm: -7, lowerUm: -20, source: ISO286, readIn: SHAFT_COPIES },
  { cls: 'g6', overMm: 30, upToMm: 50, upperUm: -9, lowerUm: -25, source: ISO286, readIn: SHAFT_COPIES },
  { cls: 'h6', overMm: 18, upToMm: 30, upperUm: 0, lowerUm: -13, source: ISO286, readIn: H6_COPIES },
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

/** Every table row, with a short name for notes (e.g. "ISO 273 M6", "ISO 286-2 g6 18–30 mm"). */
export function fitTableRows(): { name: string; row: RowProvenance }[] {
  return [
    ...ISO_273.map((row) => ({ name: `ISO 273 ${row.names[0]}`, row })),
    ...ASME_B18_2_8.map((row) => ({ name: `ASME B18.2.8 ${row.names.at(-1)} in`, row })),
    ...ISO_286_2.map((row) => ({ name: `ISO 286-2 ${row.cls} ${row.overMm}–${row.upToMm} mm`, row })),
  ];
}

/** One sentence on the fit tables for method notes: how many rows were checked against published copies, and which are from memory. */
export function fitTablesNote(): string {
  const rows = fitTableRows();
  const memory = rows.filter((r) => r.row.fromMemory).map((r) => r.name);
  const checked = `${rows.length - memory.length} of ${rows.length} rows of the fit tables (ISO 273, ASME B18.2.8, ISO 286-2) were checked against published copies of the tables`;
  return memory.length === 0
    ? `${checked}; none is from memory.`
    : `${checked}; from memory, not yet checked: ${memory.join(', ')}.`;
}

/**
 * Where a family's radial tolerance comes from, in one sentence: the fastener's table row (and whether that row
 * was checked or is from memory), the pin and hole, or the tolerance stated in the pattern. `fit` and
 * `holeDiameterMm` in mm (a pattern after patternToMm); `length` formats mm for the reader (default: "0.30 mm"). A fit
 * the tables cannot answer is described by the reason, not thrown.
 */
export function fitSourceNote(familyName: string, fit: FitSpec, holeDiameterMm: number, length: (mm: number) => string = (mm) => `${mm.toFixed(2)} mm`): string {
  let tol: number;
  try { tol = radialToleranceMm(fit, holeDiameterMm); } catch (e) { return `${familyName}: ${(e as Error).message}.`; }
  if ('toleranceMm' in fit) return `${familyName}: ${length(tol)} radial tolerance, set in the pattern.`;
  if ('pinDiameter' in fit) return `${familyName}: a ${length(fit.pinDiameter)} pin in the ${length(holeDiameterMm)} hole, (hole − pin)/2 = ${length(tol)}.`;
  const row = clearanceRow(fit.fastener)!;
  const standard = ISO_273.includes(row) ? 'ISO 273' : 'ASME B18.2.8';
  const how = row.fromMemory ? 'that table row is from memory, not yet checked against the standard' : 'that table row was checked against published copies of the table';
  return `${familyName}: ${fit.fastener} through a ${fit.clearance} clearance hole of ${length(clearanceHoleMm(fit.fastener, fit.clearance))} (${standard}), (hole − fastener)/2 = ${length(tol)}; ${how}.`;
}
