/**
 * Stage 12 — what the report must say besides the numbers: the warnings (a placement the photo cannot settle, a shape
 * not observed, a measured distance not used or disagreeing with the photo by more than 3σ) and the bed's summary
 * (verdict.ts), whose sentence says when the labels are uncertain.
 */
import type { Report, ReportShapeCheck } from '../contract';
import type { Lattice } from '../lattice';
import { bedVerdict } from '../verdict';

/** A measured distance disagreeing with the photo by more than this many σ is warned about. */
const DISTANCE_WARN_SIGMAS = 3;

export function reportWarnings(tiedShifts: number, shapeReason: string | undefined, distanceRows: Report['distances']): string[] {
  const warnings: string[] = [];
  if (tiedShifts > 1) warnings.push(`the photo does not show where the lattice starts (${tiedShifts} whole-pitch placements fit equally well); labels assume the holes seen are centred on the pattern`);
  if (shapeReason) warnings.push(`lattice shape not observed: ${shapeReason}`);
  for (const d of distanceRows ?? []) {
    if (!d.used) warnings.push(`the distance ${d.from} to ${d.to} was not used: ${d.note}`);
    else if (Math.abs(d.residualSigmas!) > DISTANCE_WARN_SIGMAS) warnings.push(`the distance ${d.from} to ${d.to} (${d.mm} mm) disagrees with the photo by ${d.residualMm!.toFixed(2)} mm, ${Math.abs(d.residualSigmas!).toFixed(1)} times its uncertainty: check the measurement and the labels`);
  }
  return warnings;
}

export function reportSummary(positions: Report['positions'], panels: Report['panels'], lat: Lattice, notExpected: Uint8Array, shapeCheck: ReportShapeCheck, tiedShifts: number): Report['summary'] {
  const summary = bedVerdict(positions, panels, lat, notExpected, shapeCheck);
  if (tiedShifts > 1) summary.sentence = summary.sentence.replace(/\.$/, '; labels are uncertain because the photo does not show where the lattice starts.');
  return summary;
}
