/**
 * The size a blurred rim implies. Defocus spreads a hole's rim and lifts its dark floor, so the levels the detector
 * measures between (its floor and its surround) close in and the rim it finds half-way between them lies inside
 * the true one: a 14 px hole blurred by σ 3–4 px reads 0.70–0.80 of its size. Fitting the blur itself recovers the
 * size: the hole's mean radial profile, in linear light (where optics blur), against a dark disc of radius r
 * blurred by a Gaussian of σ, on a surround that may have a ring of its own level out to r₂ (an insert's flange,
 * a chamfer; r₂ one of 1.3–2.3 times the family's radius, or none),
 *   L(ρ) = a − b · P(ρ; r, σ) + c · P(ρ; r₂, σ),  P(ρ; r, σ) = ∫₀^r (t/σ²) exp(−(t² + ρ²)/(2σ²)) I₀(tρ/σ²) dt,
 * the share of a 2-D Gaussian centred at distance ρ from the disc's centre that falls inside it (the Rice
 * distribution's CDF at r, 1 − Q₁(ρ/σ, r/σ) in Marcum's Q; from memory). a, b and c by linear least squares for
 * each (r, σ, r₂); r and σ by a grid, then a finer one about its best; b, the bore's depth below what surrounds it,
 * must be positive.
 *
 * Frames: bed plane mm (the square's frame, see target.ts) for the centre; radii and σ in image px at the hole.
 */
import { toLinear } from './square';

/** I₀(x)·e^(−x) for x ≥ 0 (Abramowitz & Stegun 9.8.1–9.8.2, |error| < 2·10⁻⁷ relative; from memory). */
function besselI0Scaled(x: number): number {
  if (x <= 3.75) {
    const t = (x / 3.75) ** 2;
    return (1 + t * (3.5156229 + t * (3.0899424 + t * (1.2067492 + t * (0.2659732 + t * (0.0360768 + t * 0.0045813)))))) * Math.exp(-x);
  }
  const t = 3.75 / x;
  return (0.39894228 + t * (0.01328592 + t * (0.00225319 + t * (-0.00157565 + t * (0.00916281 + t * (-0.02057706 + t * (0.02635537 + t * (-0.01647633 + t * 0.00392377)))))))) / Math.sqrt(x);
}

/** Share of a 2-D Gaussian of σ centred ρ from a disc's centre that lies inside the disc of radius r (same units). */
export function discBlurShare(rho: number, r: number, sigma: number): number {
  const s2 = sigma * sigma;
  // the integrand is negligible more than 6σ from t = ρ
  const t0 = Math.max(0, rho - 6 * sigma);
  const t1 = Math.min(r, rho + 6 * sigma);
  if (t1 <= t0) return 0;
  const n = 32; // Simpson intervals
  const hStep = (t1 - t0) / n;
  let s = 0;
  for (let i = 0; i <= n; i++) {
    const t = t0 + i * hStep;
    const f = (t / s2) * Math.exp(-((t - rho) ** 2) / (2 * s2)) * besselI0Scaled((t * rho) / s2);
    s += f * (i === 0 || i === n ? 1 : i % 2 ? 4 : 2);
  }
  return Math.min(1, (s * hStep) / 3);
}

export interface BlurredRimFit {
  /** The hole's radius and the blur's σ, px. */
  rPx: number;
  sigmaPx: number;
  /** The bore's depth below its immediate surround, linear light (0–1), and the profile's RMS misfit in the same units. */
  depth: number;
  rms: number;
}

/**
 * Fits the blurred-disc model to a mean radial profile: `profile[i]` is the linear light at ρ = i · stepPx from the
 * centre. Radii are searched over 0.5–1.5 × `rGuessPx`, σ over 0.5–8 px.
 */
export function fitBlurredRim(profile: number[], stepPx: number, rGuessPx: number): BlurredRimFit | null {
  const rho = profile.map((_, i) => i * stepPx);
  const curve = (r: number, sigma: number) => rho.map((x) => discBlurShare(x, r, sigma));
  // rings about the bore (an insert's flange, a chamfer) of a level of their own, out to these radii
  const rings = [1.3, 1.55, 1.8, 2.05, 2.3].map((f) => f * rGuessPx);
  const ringCurves = new Map<number, number[][]>();
  const ringsAt = (sigma: number) => {
    let c = ringCurves.get(sigma);
    if (!c) ringCurves.set(sigma, (c = rings.map((r2) => curve(r2, sigma))));
    return c;
  };
  const evalAt = (r: number, sigma: number): BlurredRimFit | null => {
    const P = curve(r, sigma);
    let fit: BlurredRimFit | null = null;
    const Qs = ringsAt(sigma);
    for (let k = -1; k < rings.length; k++) {
      if (k >= 0 && rings[k]! < 1.15 * r) continue;
      const c = leastSquares(k < 0 ? [P] : [P, Qs[k]!], profile);
      if (!c || !(c.coef[0]! < 0)) continue;
      const f = { rPx: r, sigmaPx: sigma, depth: -c.coef[0]!, rms: c.rms };
      if (!fit || f.rms < fit.rms) fit = f;
    }
    return fit;
  };
  let best: BlurredRimFit | null = null;
  const consider = (r: number, sigma: number) => {
    const f = evalAt(r, sigma);
    if (f && (!best || f.rms < best.rms)) best = f;
  };
  const rSteps = 20;
  const sSteps = 16;
  const sAt = (k: number) => 0.5 * 16 ** (k / sSteps); // 0.5 to 8 px, geometric
  for (let i = 0; i <= rSteps; i++) for (let k = 0; k <= sSteps; k++) consider(rGuessPx * (0.5 + i / rSteps), sAt(k));
  if (!best) return null;
  // a finer grid about the best: a quarter of the coarse steps
  const b0: BlurredRimFit = best;
  const kBest = (sSteps * Math.log(b0.sigmaPx / 0.5)) / Math.log(16);
  for (let i = -4; i <= 4; i++) for (let k = -4; k <= 4; k++) consider(b0.rPx + (i / 4) * (rGuessPx / rSteps), sAt(kBest + k / 4));
  return best;
}

/** Least squares of y on a constant and the given columns: their coefficients (constant first) and the RMS misfit. */
function leastSquares(cols: number[][], y: number[]): { coef: number[]; rms: number } | null {
  const n = y.length;
  const X = [...cols, y.map(() => 1)];
  const m = X.length;
  // normal equations, solved by Gaussian elimination with partial pivoting
  const A = X.map((a) => [...X.map((b) => a.reduce((s, v, i) => s + v * b[i]!, 0)), a.reduce((s, v, i) => s + v * y[i]!, 0)]);
  for (let c = 0; c < m; c++) {
    let p = c;
    for (let r = c + 1; r < m; r++) if (Math.abs(A[r]![c]!) > Math.abs(A[p]![c]!)) p = r;
    if (Math.abs(A[p]![c]!) < 1e-12) return null;
    [A[c], A[p]] = [A[p]!, A[c]!];
    for (let r = c + 1; r < m; r++) {
      const f = A[r]![c]! / A[c]![c]!;
      for (let k = c; k <= m; k++) A[r]![k]! -= f * A[c]![k]!;
    }
  }
  const coef = new Array<number>(m).fill(0);
  for (let r = m - 1; r >= 0; r--) {
    let s = A[r]![m]!;
    for (let k = r + 1; k < m; k++) s -= A[r]![k]! * coef[k]!;
    coef[r] = s / A[r]![r]!;
  }
  let e = 0;
  for (let i = 0; i < n; i++) e += (y[i]! - X.reduce((s, col, k) => s + coef[k]! * col[i]!, 0)) ** 2;
  return { coef, rms: Math.sqrt(e / n) };
}

/**
 * The hole's mean radial profile about (cx, cy) on the bed plane (mm; `mmPerPx` there), in linear light: at each
 * ρ = i · stepPx up to `rhoMaxPx`, the median over 32 rays (a screw or a chip on a few rays does not move it).
 */
export function radialProfile(at: (x: number, y: number) => number, cx: number, cy: number, mmPerPx: number, rhoMaxPx: number, stepPx: number): number[] {
  const rays = 32;
  const out: number[] = [];
  const vals = new Float64Array(rays);
  for (let i = 0; i * stepPx <= rhoMaxPx; i++) {
    const rho = i * stepPx * mmPerPx;
    for (let k = 0; k < rays; k++) vals[k] = toLinear(at(cx + rho * Math.cos((2 * Math.PI * k) / rays), cy + rho * Math.sin((2 * Math.PI * k) / rays)));
    const s = vals.slice().sort();
    out.push((s[rays / 2 - 1]! + s[rays / 2]!) / 2);
  }
  return out;
}
