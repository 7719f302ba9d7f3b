/**
 * The uncertainty band, defined once for every verdict and every comparison (bed frame, mm).
 *
 * A measured position's uncertainty σ (mm) is the per-axis standard uncertainty of an isotropic 2-D normal
 * error. Its 95 % region is a disc of radius k·σ around the measured point, k = √(−2 ln 0.05) ≈ 2.4477: the
 * radius R = |error|/σ follows the Rayleigh law, P(R ≤ k) = 1 − exp(−k²/2) (equivalently R² is chi-square
 * with 2 degrees of freedom). The per-axis 1.96 σ of a 1-D normal covers only about 85 % of a 2-D error.
 */

/** Coverage of the band (fraction). */
export const BAND_COVERAGE = 0.95;

/** Radius of the band in units of the per-axis σ: √(−2 ln(1 − coverage)) ≈ 2.4477. */
export const BAND_K = Math.sqrt(-2 * Math.log(1 - BAND_COVERAGE));

/** Radius (mm) of the 95 % band of a 2-D position error with per-axis standard uncertainty σ (mm). */
export function bandRadiusMm(sigmaMm: number): number {
  return BAND_K * sigmaMm;
}

/** Per-axis σ (mm) of the difference of two independent measurements with per-axis σa, σb (mm). */
export function combinedSigmaMm(sigmaAMm: number, sigmaBMm: number): number {
  return Math.hypot(sigmaAMm, sigmaBMm);
}

/** True when a 2-D change of length rMm (mm) lies outside the 95 % band of a per-axis σ (mm). */
export function beyondBand(rMm: number, sigmaMm: number): boolean {
  return rMm > bandRadiusMm(sigmaMm);
}

/** The band in one sentence, for method notes on every report surface. */
export const BAND_NOTE = `Uncertainty bands are the 95 % radius of a 2-D normal error: ${BAND_K.toFixed(2)} × the per-axis standard uncertainty σ.`;
