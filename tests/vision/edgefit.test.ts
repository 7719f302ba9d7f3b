import { describe, expect, it } from 'vitest';
import { correlationFactor, fitSquareEdges, type Px } from '@/lib/vision/edgefit';
import { applyH, homographyFrom4 } from '@/lib/geometry/homography';
import { mulberry32, normalFrom } from '@/lib/geometry/random';

/**
 * Edge points of a framed square drawn exactly: a homography from the unit frame (corner quad chosen below), then
 * Brown–Conrady radial distortion x_d = x_u (1 + k1 r² + k2 r⁴) about the image centre (the renderer's lens model,
 * not the fit's division model), then each point moved by `bias` px towards the light side along the image normal,
 * and Gaussian noise. Image 2000 × 1500 px; coordinates normalised by 1000 px for the lens, as a 27 mm lens on it.
 */
const W = 2000;
const H = 1500;
const QUAD: Px[] = [[720, 1010], [1150, 985], [1135, 560], [700, 590]];
const Hu = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], QUAD);
const F = 1800;
const distort = (p: Px, k1: number, k2: number): Px => {
  const x = (p[0] - W / 2) / F, y = (p[1] - H / 2) / F;
  const r2 = x * x + y * y, s = 1 + k1 * r2 + k2 * r2 * r2;
  return [W / 2 + F * x * s, H / 2 + F * y * s];
};
const trueCorners = (k1: number, k2: number) => ([[0, 0], [1, 0], [1, 1], [0, 1]] as const).map(([u, v]) => distort(applyH(Hu, u, v), k1, k2));

function edges(o: { k1: number; k2: number; bias: number; noise: number; seed: number; frame: boolean }) {
  const g = normalFrom(mulberry32(o.seed));
  const f = 0.1;
  const side = (s: number, inner: boolean): Px[] => {
    const a = inner ? f : 0;
    const A = [[a, a], [1 - a, a], [1 - a, 1 - a], [a, 1 - a]][s]!, B = [[a, a], [1 - a, a], [1 - a, 1 - a], [a, 1 - a]][(s + 1) % 4]!;
    const out: Px[] = [];
    for (let k = 0; k < 150; k++) {
      const t = 0.06 + (0.88 * k) / 149;
      const u = A[0]! + (B[0]! - A[0]!) * t, v = A[1]! + (B[1]! - A[1]!) * t;
      const p = distort(applyH(Hu, u, v), o.k1, o.k2);
      // image normal towards the light side: outward for the outer edge, inward for the inner edge
      const mid = distort(applyH(Hu, 0.5, 0.5), o.k1, o.k2);
      const q = distort(applyH(Hu, u + (B[0]! - A[0]!) * 1e-3, v + (B[1]! - A[1]!) * 1e-3), o.k1, o.k2);
      const tx = q[0] - p[0], ty = q[1] - p[1], L = Math.hypot(tx, ty);
      let n: Px = [ty / L, -tx / L];
      if (n[0] * (p[0] - mid[0]) + n[1] * (p[1] - mid[1]) < 0) n = [-n[0], -n[1]];
      const toLight = inner ? -1 : 1;
      const d = toLight * o.bias + o.noise * g();
      out.push([p[0] + n[0] * d, p[1] + n[1] * d]);
    }
    return out;
  };
  return { outer: [0, 1, 2, 3].map((s) => side(s, false)), ...(o.frame ? { inner: [0, 1, 2, 3].map((s) => side(s, true)), frameFraction: f } : {}) };
}

const guess = QUAD.map((p) => [p[0] + 0.7, p[1] - 0.5] as Px);
const maxErr = (c: readonly Px[], t: readonly Px[]) => Math.max(...c.map((p, i) => Math.hypot(p[0] - t[i]![0], p[1] - t[i]![1])));

describe('joint fit of the square\'s edges', () => {
  it('puts a framed square\'s corners on the truth under barrel and pincushion distortion and measures the edge bias', () => {
    // the former per-side curves, carried out from the stroke's centreline by a homography, missed by 0.1–0.2 px here
    for (const [k1, k2, bias] of [[-0.06, 0.02, 0.45], [0.05, 0, -0.5], [0, 0, 0]] as const) {
      const r = fitSquareEdges(edges({ k1, k2, bias, noise: 0, seed: 1, frame: true }), guess, { width: W, height: H })!;
      expect(r).not.toBeNull();
      expect(maxErr(r.corners, trueCorners(k1, k2))).toBeLessThan(0.01);
      for (const b of r.biasPx) expect(Math.abs(b - bias)).toBeLessThan(0.01);
    }
  });

  it('states a corner covariance that matches the scatter of repeated noisy fits (covariance propagation, Hartley & Zisserman 2nd ed. §5.2)', () => {
    const n = 40;
    let se = 0, sv = 0;
    for (let seed = 1; seed <= n; seed++) {
      const r = fitSquareEdges(edges({ k1: -0.04, k2: 0, bias: 0.2, noise: 0.08, seed, frame: true }), guess, { width: W, height: H })!;
      const t = trueCorners(-0.04, 0);
      r.corners.forEach((p, i) => { se += (p[0] - t[i]![0]) ** 2 + (p[1] - t[i]![1]) ** 2; });
      sv += 8 * r.cornerSigmaPx ** 2;
    }
    // RMS error over stated σ near 1 (40 × 8 correlated coordinates: ±25 % is wide of chance)
    const ratio = Math.sqrt(se / sv);
    expect(ratio).toBeGreaterThan(0.75);
    expect(ratio).toBeLessThan(1.3);
  });

  it('holds a plain square\'s unmeasurable bias at its prior and adds the prior\'s 1σ to the corners', () => {
    const e = edges({ k1: -0.03, k2: 0, bias: 0.4, noise: 0.03, seed: 3, frame: false });
    const r = fitSquareEdges(e, guess, { width: W, height: H, biasPrior: { meanPx: 0, sigmaPx: 0.5 } })!;
    // a bias of b moves a corner by about b √2 along its diagonal: 0.5 px per axis per 0.5 px of bias
    expect(r.cornerSigmaPx).toBeGreaterThan(0.4);
    expect(r.biasSigmaPx).toBe(0.5);
    const err = maxErr(r.corners, trueCorners(-0.03, 0));
    expect(err).toBeGreaterThan(0.4); // the true bias of 0.4 px is not seen by outer edges alone …
    expect(err).toBeLessThan(3 * r.cornerSigmaPx * Math.SQRT2); // … and lies within the stated uncertainty
    // with the bias known, the corners come out right
    const k = fitSquareEdges(e, guess, { width: W, height: H, biasPrior: { meanPx: 0.4, sigmaPx: 0.01 } })!;
    expect(maxErr(k.corners, trueCorners(-0.03, 0))).toBeLessThan(0.03);
  });
});

describe('effective sample size of correlated residuals', () => {
  it('gives (1 + ρ)/(1 − ρ) for an AR(1) series and 1 for white noise (variance of the mean of an AR(1) process, common practice)', () => {
    const g = normalFrom(mulberry32(9));
    const white = Array.from({ length: 4000 }, () => g());
    expect(correlationFactor(white)).toBeLessThan(1.15);
    const rho = 0.6;
    const ar: number[] = [0];
    for (let i = 1; i < 4000; i++) ar.push(rho * ar[i - 1]! + Math.sqrt(1 - rho * rho) * g());
    expect(correlationFactor(ar)).toBeGreaterThan(0.85 * ((1 + rho) / (1 - rho)));
    expect(correlationFactor(ar)).toBeLessThan(1.15 * ((1 + rho) / (1 - rho)));
  });
});
