/**
 * Display units. Every length in Gridproof is millimetres (bed frame) until it is shown; these helpers convert
 * at the moment of display only, to the user's choice of mm or inches (25.4 mm per inch, exact by definition).
 * Resolution shown: 0.01 mm, or 0.0001 in ("tenths", common practice in inch shops).
 */
import { MM_PER_IN } from '@/lib/geometry/contract';

export type LengthUnit = 'mm' | 'in';

/** Decimal places shown for a length in each unit. */
export const UNIT_DECIMALS: Record<LengthUnit, number> = { mm: 2, in: 4 };

/** A length given in mm, in the display unit (a number, not rounded). */
export function fromMm(mm: number, unit: LengthUnit): number {
  return unit === 'mm' ? mm : mm / MM_PER_IN;
}

/** A length given in the display unit, in mm. */
export function toMm(value: number, unit: LengthUnit): number {
  return unit === 'mm' ? value : value * MM_PER_IN;
}

/** "0.12 mm" / "0.0047 in"; `signed` adds + for positive values; uses a real minus sign. */
export function formatLength(mm: number, unit: LengthUnit, opts: { signed?: boolean; decimals?: number; suffix?: boolean } = {}): string {
  const v = fromMm(mm, unit);
  const d = opts.decimals ?? UNIT_DECIMALS[unit];
  const rounded = Number(v.toFixed(d));
  const abs = Math.abs(rounded).toFixed(d);
  const sign = rounded < 0 ? '−' : opts.signed && rounded > 0 ? '+' : '';
  return `${sign}${abs}${opts.suffix === false ? '' : ` ${unit}`}`;
}

/** A plain number string for CSV (ASCII minus, no unit), rounded one place finer than the display. */
export function csvLength(mm: number | null | undefined, unit: LengthUnit): string {
  if (mm === null || mm === undefined || !Number.isFinite(mm)) return '';
  return fromMm(mm, unit).toFixed(UNIT_DECIMALS[unit] + 1);
}

/**
 * Scale as a deviation in parts per million: 1.0003 → "+300 ppm"; with its 1σ (a ratio, 6e-5) "+300 ± 60 ppm". Every
 * surface (web, PDF) writes scale this way.
 */
export function formatPpm(scale: number, sigma?: number | null): string {
  const ppm = Math.round((scale - 1) * 1e6);
  const pm = sigma === null || sigma === undefined ? '' : ` ± ${Math.round(Math.abs(sigma) * 1e6)}`;
  return `${ppm > 0 ? '+' : ppm < 0 ? '−' : ''}${Math.abs(ppm)}${pm} ppm`;
}

/**
 * Decimal places shown for an angle, degrees: 0.001°, which turns a line 1 m long by 0.017 mm at its end
 * (1000 mm × tan 0.001°), about the 0.01 mm lengths are shown to.
 */
export const ANGLE_DECIMALS = 3;

/**
 * An angle in degrees, as every surface (web, PDF, mail) writes one: "0.012°"; `signed` "+0.012°" / "−0.012°" (a
 * real minus sign); with its uncertainty `sigmaDeg` "+0.012° ± 0.003°", each with its degree sign, and one below
 * the resolution "± < 0.001°" (never "± 0.000°"); `suffix: false` leaves the sign out where a column heading carries it.
 */
export function formatAngle(deg: number, opts: { signed?: boolean; sigmaDeg?: number | null; suffix?: boolean } = {}): string {
  const rounded = Number(deg.toFixed(ANGLE_DECIMALS));
  const sign = rounded < 0 ? '−' : opts.signed && rounded > 0 ? '+' : '';
  const unit = opts.suffix === false ? '' : '°';
  const value = `${sign}${Math.abs(rounded).toFixed(ANGLE_DECIMALS)}${unit}`;
  if (opts.sigmaDeg === null || opts.sigmaDeg === undefined) return value;
  const sigma = Number(Math.abs(opts.sigmaDeg).toFixed(ANGLE_DECIMALS));
  return `${value} ± ${sigma === 0 ? `< ${(10 ** -ANGLE_DECIMALS).toFixed(ANGLE_DECIMALS)}` : sigma.toFixed(ANGLE_DECIMALS)}${unit}`;
}

/** What a scale deviation means over a length: (scale − 1) × length, in the display unit. */
export function scaleOver(scale: number, lengthMm: number, unit: LengthUnit): string {
  return formatLength((scale - 1) * lengthMm, unit, { signed: true });
}
