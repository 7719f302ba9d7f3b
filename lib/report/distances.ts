/**
 * One sentence per measured distance given with a check, for the PDF and other plain-text views: what was given,
 * the photo's length with the reference square alone, the length after the fit and the residual (given − fit) with
 * its size in σ. `len` formats a length in mm in the reader's unit.
 */
import type { ReportDistance } from '@/lib/geometry/contract';

export function distanceSentence(d: ReportDistance, len: (mm: number) => string): string {
  const head = `Measured distance ${d.from} to ${d.to}: given ${len(d.mm)} ± ${len(d.sigmaMm)}`;
  if (!d.used || d.fittedMm === null || d.residualMm === null) return `${head}; not used${d.note ? ` (${d.note})` : ''}.`;
  const sign = d.residualMm >= 0 ? '+' : '−';
  return `${head}; photo with the square alone ${d.squareMm === null ? '—' : len(d.squareMm)}, after the fit ${len(d.fittedMm)}; given − fit ${sign}${len(Math.abs(d.residualMm))}, ${Math.abs(d.residualSigmas ?? 0).toFixed(1)} times its uncertainty.`;
}
