import { describe, expect, it } from 'vitest';
import { Matrix, pseudoInverse, solve } from 'ml-matrix';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { formFit, shapeCheck, weightedAffine } from '@/lib/geometry/form';
import { buildLattice } from '@/lib/geometry/lattice';
import { presetById } from '@/lib/geometry/presets';
import { mulberry32, normalFrom } from '@/lib/geometry/random';
import { makeScene, type SceneSpec } from '@/lib/geometry/synthetic';
import { rigid2 } from '@/lib/geometry/umeyama';
import { patternToMm } from '@/lib/geometry/units';
import { bandRadiusMm } from '@/lib/geometry/band';

const IN = 25.4;
const m6 = presetById('m6-50')!.size({ bedWidthMm: 1200, bedHeightMm: 1000, stripWidthMm: 250 });
const small = presetById('in-3-quarter20-dogs')!.size({ bedWidthMm: 36 * IN, bedHeightMm: 24 * IN, stripWidthMm: 6 * IN });
const clean: Partial<SceneSpec> = { tiltDeg: 8, k1: -0.04, k2: 0.01, rollDeg: 3, square: { sizeMm: 150, x: 420, y: 380, angleDeg: 8 } };

/** Design matrix rows [1, x, y] of nominal points, and an independent weighted least-squares solve (ml-matrix). */
function mlAffine(nom: number[], meas: number[], w: number[]) {
  const n = w.length;
  const X = new Matrix(nom.length / 2, 3);
  for (let i = 0; i < n; i++) X.setRow(i, [1, nom[2 * i]!, nom[2 * i + 1]!]);
  const sw = Matrix.diag(w.map(Math.sqrt));
  const Xw = sw.mmul(X);
  const yx = sw.mmul(Matrix.columnVector(w.map((_, i) => meas[2 * i]!))), yy = sw.mmul(Matrix.columnVector(w.map((_, i) => meas[2 * i + 1]!)));
  return { X, px: solve(Xw, yx, true).to1DArray(), py: solve(Xw, yy, true).to1DArray() };
}

/** Truth's form deviations: the same robust affine applied to the scene's noise-free true positions. */
function truthForm(nom: number[], trueXY: number[]): Float64Array {
  return formFit(nom, trueXY, new Float64Array(nom.length / 2).fill(0.01)).residualMm;
}

describe('weighted affine fit', () => {
  it('agrees with an independent weighted least-squares solve and with the exact residual covariance (ml-matrix)', () => {
    const rand = mulberry32(7), g = normalFrom(rand);
    const n = 60, nom: number[] = [], meas: number[] = [], sig: number[] = [], w: number[] = [];
    for (let i = 0; i < n; i++) {
      const x = 1000 * rand(), y = 700 * rand();
      nom.push(x, y);
      meas.push(3 + 1.001 * x + 0.0004 * y + 0.1 * g(), -2 - 0.0003 * x + 0.9995 * y + 0.1 * g());
      sig.push(0.02 + 0.05 * rand());
      w.push(i % 7 === 0 ? 0 : rand() + 0.2);
    }
    const fit = weightedAffine(nom, meas, sig, w);
    const { X, px, py } = mlAffine(nom, meas, w);
    // y = t + L x: ml-matrix's least-squares solution (independent library).
    expect(fit.affine.t[0]).toBeCloseTo(px[0]!, 8); expect(fit.affine.L[0]).toBeCloseTo(px[1]!, 10); expect(fit.affine.L[1]).toBeCloseTo(px[2]!, 10);
    expect(fit.affine.t[1]).toBeCloseTo(py[0]!, 8); expect(fit.affine.L[2]).toBeCloseTo(py[1]!, 10); expect(fit.affine.L[3]).toBeCloseTo(py[2]!, 10);
    // Residual covariance per axis: (I − P) Σ (I − P)ᵀ with P = X (Xᵀ W X)⁻¹ Xᵀ W, built as dense matrices.
    const W = Matrix.diag(w), S = Matrix.diag(sig.map((s) => s * s));
    const P = X.mmul(pseudoInverse(X.transpose().mmul(W).mmul(X))).mmul(X.transpose()).mmul(W);
    const IP = Matrix.eye(n).sub(P);
    const C = IP.mmul(S).mmul(IP.transpose());
    for (let i = 0; i < n; i++) expect(fit.sigmaMm[i]!).toBeCloseTo(Math.sqrt(C.get(i, i)), 9);
  });

  it('is not tilted by a few bad holes, where a plain least-squares fit is', () => {
    const rand = mulberry32(3), g = normalFrom(rand);
    const nom: number[] = [], meas: number[] = [];
    for (let i = 0; i < 15; i++) for (let j = 0; j < 10; j++) { nom.push(50 * i, 50 * j); meas.push(50 * i + 0.01 * g(), 50 * j + 0.01 * g()); }
    // Four holes in one corner 3 mm off in the same direction.
    for (const k of [0, 1, 10, 11]) meas[2 * k]! += 3;
    const sig = new Array(nom.length / 2).fill(0.01);
    const robust = formFit(nom, meas, sig), plain = weightedAffine(nom, meas, sig, sig.map(() => 1));
    const far = nom.length / 2 - 1; // the opposite corner
    expect(Math.abs(robust.residualMm[2 * far]!)).toBeLessThan(0.05);
    expect(Math.abs(plain.residualMm[2 * far]!)).toBeGreaterThan(0.05);
    for (const k of [0, 1, 10, 11]) expect(robust.residualMm[2 * k]!).toBeGreaterThan(2.9);
  });
});

describe('hole-to-hole (form) deviations of a report', () => {
  it('are zero on an affine-distorted perfect lattice, whose distortion the shape check shows', () => {
    const scene = makeScene({ pattern: m6, ...clean, seed: 4, scaleX: 1.002, scaleY: 0.9985, squarenessDeg: 0.08 });
    const r = analyzePoints(scene.points, m6);
    const measured = r.positions.filter((p) => p.measured);
    expect(measured.length).toBeGreaterThan(300);
    for (const p of measured) expect(p.form!.r).toBeLessThan(0.002);
    // Expected: the true positions placed on nominal by the best rigid fit (Umeyama 1991), largest residual.
    const lat = buildLattice(patternToMm(m6));
    const nom = lat.positions.flatMap((q) => [q.x, q.y]);
    const rg = rigid2(scene.truth.trueXY, nom, lat.positions.length);
    const c = Math.cos(rg.angleRad), s = Math.sin(rg.angleRad);
    let worst = 0;
    lat.positions.forEach((q, i) => { const x = scene.truth.trueXY[2 * i]!, y = scene.truth.trueXY[2 * i + 1]!; worst = Math.max(worst, Math.hypot(c * x - s * y + rg.tx - q.x, s * x + c * y + rg.ty - q.y)); });
    const sc = r.lattice.shapeCheck!;
    expect(Math.abs(sc.worstMm! - worst)).toBeLessThan(3 * sc.uncertaintyMm! + 0.005);
    expect(worst).toBeGreaterThan(sc.toleranceMm + bandRadiusMm(sc.uncertaintyMm!));
    expect(sc.verdict).toBe('out');
    // The bed fails on its overall size, not on any hole.
    expect(r.summary.verdict).toBe('fail');
    expect(r.summary.formOut).toBe(0);
    expect(r.summary.sentence).toMatch(/overall size and squareness/);
  });

  it("shows a single moved hole's full move minus the fit's leverage", () => {
    // Noise-free lattice, one point moved: its residual is (1 − Pₖₖ)·move with Pₖₖ = wₖ xₖᵀ (Xᵀ W X)⁻¹ xₖ, the
    // weighted leverage (hat matrix built with ml-matrix from the fit's final weights).
    const nom: number[] = [];
    for (let i = 0; i < 12; i++) for (let j = 0; j < 9; j++) nom.push(50 * i, 50 * j);
    const n = nom.length / 2, k = 40, move: [number, number] = [0.5, -0.3];
    const meas = nom.map((v, i) => v * (i % 2 ? 0.999 : 1.001) + (i === 2 * k ? move[0] : i === 2 * k + 1 ? move[1] : 0));
    const fit = formFit(nom, meas, new Array(n).fill(0.02));
    const w = Array.from(fit.weights);
    const X = new Matrix(Array.from({ length: n }, (_, i) => [1, nom[2 * i]!, nom[2 * i + 1]!]));
    const P = X.mmul(pseudoInverse(X.transpose().mmul(Matrix.diag(w)).mmul(X))).mmul(X.transpose()).mmul(Matrix.diag(w));
    expect(fit.residualMm[2 * k]!).toBeCloseTo((1 - P.get(k, k)) * move[0], 9);
    expect(fit.residualMm[2 * k + 1]!).toBeCloseTo((1 - P.get(k, k)) * move[1], 9);
    for (let i = 0; i < n; i++) if (i !== k) expect(fit.residualMm[2 * i]!).toBeCloseTo(-P.get(i, k) * move[0], 9);
  });

  it('shows a moved hole in a photo with its full move, less at most its unweighted leverage', () => {
    const lat = buildLattice(patternToMm(m6));
    const k = 150, move: [number, number] = [0.5, -0.3];
    const scene = makeScene({ pattern: m6, ...clean, seed: 5, extraDeviation: new Map([[k, move]]) });
    const r = analyzePoints(scene.points, m6);
    const idx = r.positions.map((p, i) => (p.measured ? i : -1)).filter((i) => i >= 0);
    expect(idx).toContain(k);
    // Leverage of the hole in the affine design [1, x, y] over the matched positions: hᵢᵢ = xᵢᵀ (XᵀX)⁻¹ xᵢ (ml-matrix);
    // the robust fit weighs the moved hole down, so what it takes out lies between 0 and hᵢᵢ·move.
    const X = new Matrix(idx.map((i) => [1, lat.positions[i]!.x, lat.positions[i]!.y]));
    const H = X.mmul(pseudoInverse(X.transpose().mmul(X))).mmul(X.transpose());
    const kk = idx.indexOf(k), h = H.get(kk, kk);
    const f = r.positions[k]!.form!;
    for (const [got, m] of [[f.dx, move[0]], [f.dy, move[1]]] as const) {
      expect(Math.abs(got)).toBeGreaterThan((1 - h) * Math.abs(m) - 1e-3);
      expect(Math.abs(got)).toBeLessThan(Math.abs(m) + 1e-3);
    }
    expect(f.verdict).toBe('out');
    // Every other hole stays where it is, to well under a micrometre per unit of leverage.
    idx.forEach((i) => { if (i !== k) expect(r.positions[i]!.form!.r).toBeLessThan(2e-3); });
  });

  it('shows a panel shifted as a rigid body in its holes, out where it binds', () => {
    const lat = buildLattice(patternToMm(m6));
    const j = lat.panels.findIndex((p) => p.id === 'S3');
    const extra = new Map<number, [number, number]>();
    lat.positions.forEach((q, i) => { if (q.panel === j) extra.set(i, [0, 0.6]); });
    const scene = makeScene({ pattern: m6, ...clean, seed: 6, centreNoisePx: 0.05, extraDeviation: extra });
    const r = analyzePoints(scene.points, m6);
    const onPanel = r.positions.filter((p, i) => p.measured && lat.positions[i]!.panel === j);
    expect(onPanel.length).toBeGreaterThan(20);
    // M6 normal clearance: 6.6 mm hole for a 6 mm bolt, 0.3 mm radial (ISO 273). A 0.6 mm step binds.
    for (const p of onPanel) { expect(Math.abs(p.form!.dy)).toBeGreaterThan(0.35); expect(p.form!.verdict).toBe('out'); }
    expect(r.summary.verdict).toBe('fail');
    expect(r.summary.sentence).toMatch(/hole to hole/);
  });

  it('on seeded scenes gives no wrong verdict where the true form deviation is clear of the tolerance', () => {
    const lat = buildLattice(patternToMm(m6));
    const nom = lat.positions.flatMap((q) => [q.x, q.y]);
    let clear = 0, wrong = 0, firm = 0, all = 0;
    for (let seed = 11; seed <= 16; seed++) {
      // Holes moved by 0.05–0.7 mm, around the 0.3 mm radial tolerance of M6 in a 6.6 mm hole (ISO 273, normal).
      const rand = mulberry32(seed);
      const extra = new Map<number, [number, number]>();
      for (let m = 0; m < 40; m++) { const a = 2 * Math.PI * rand(), d = 0.05 + 0.65 * rand(); extra.set(Math.floor(rand() * lat.positions.length), [d * Math.cos(a), d * Math.sin(a)]); }
      const scene = makeScene({ pattern: m6, ...clean, seed, scaleX: 1.0008, scaleY: 0.9993, squarenessDeg: 0.04, panelShiftMm: 0.1, panelTurnDeg: 0.01, panelTrendMmPerM: { x: 0.2, y: -0.1 },
        holeSigmaMm: 0.02, centreNoisePx: 0.08, cornerNoisePx: 0.1, missingFraction: 0.03, spuriousFraction: 0.05, extraDeviation: extra });
      const r = analyzePoints(scene.points, m6);
      const idx = r.positions.map((p, i) => (p.form ? i : -1)).filter((i) => i >= 0);
      const tf = truthForm(idx.flatMap((i) => [nom[2 * i]!, nom[2 * i + 1]!]), idx.flatMap((i) => [scene.truth.trueXY[2 * i]!, scene.truth.trueXY[2 * i + 1]!]));
      idx.forEach((i, k) => {
        const p = r.positions[i]!, f = p.form!;
        const tr = Math.hypot(tf[2 * k]!, tf[2 * k + 1]!);
        all++; if (f.verdict !== 'marginal') firm++;
        // Clear: the true deviation lies outside the stated 95 % band around the tolerance by a margin of 0.02 mm.
        if (Math.abs(tr - p.toleranceMm) <= bandRadiusMm(f.uncertaintyMm) + 0.02) return;
        clear++;
        // Wrong: a firm verdict on the other side ('marginal' is not wrong, only not firm).
        if (f.verdict === (tr > p.toleranceMm ? 'in' : 'out')) wrong++;
      });
    }
    expect(clear).toBeGreaterThan(0.9 * all);
    expect(wrong).toBe(0);
    expect(firm).toBeGreaterThan(0.95 * all);
  });

  it('judges hole to hole firmly on a 36 × 24 in bed with a 4 in square, and says the overall size needs a longer reference', () => {
    // 1/4-20 inserts, normal clearance (ASME B18.2.8: 0.281 in hole for a 0.250 in screw, 0.0155 in radial).
    const scene = makeScene({ pattern: small, seed: 21, mmPerPx: 0.36, tiltDeg: 8, k1: -0.04, k2: 0.01, scaleX: 1.0005, scaleY: 0.9996, squarenessDeg: 0.03,
      holeSigmaMm: 0.03, centreNoisePx: 0.08, cornerNoisePx: 0.1, missingFraction: 0.02, square: { sizeMm: 4 * IN, x: 300, y: 250, angleDeg: 5 } });
    const r = analyzePoints(scene.points, small);
    const measured = r.positions.filter((p) => p.form);
    const firmForm = measured.filter((p) => p.form!.verdict !== 'marginal').length;
    const firmRigid = measured.filter((p) => p.verdict !== 'marginal').length;
    expect(firmForm).toBeGreaterThanOrEqual(measured.length - 1);
    expect(firmRigid).toBeLessThan(firmForm);
    expect(r.lattice.shapeCheck!.verdict).toBe('marginal');
    expect(r.summary.shapeSentence).toMatch(/larger reference target, or a measured distance between two far-apart positions/);
    expect(r.summary.sentence).not.toMatch(/too close to the tolerance to call$/);
  });

  it('leaves old reports without form and shape check valid', () => {
    const r = analyzePoints(makeScene({ pattern: m6, ...clean, seed: 2 }).points, m6);
    const old = JSON.parse(JSON.stringify(r));
    for (const p of old.positions) delete p.form;
    delete old.lattice.shapeCheck; delete old.summary.formOut; delete old.summary.formMarginal; delete old.summary.shapeSentence;
    expect(ReportSchema.safeParse(old).success).toBe(true);
    expect(ReportSchema.safeParse(r).success).toBe(true);
  });
});

describe('shape check', () => {
  it('is the largest displacement of the stretched and sheared lattice after the best rigid placement (Umeyama 1991)', () => {
    const nom: number[] = [];
    for (let i = 0; i <= 20; i++) for (let j = 0; j <= 10; j++) nom.push(60 * i, 60 * j);
    const n = nom.length / 2;
    const c = shapeCheck(nom, n, { scaleX: 1.001, scaleY: 0.9995, squarenessRad: 0 }, { scaleX: 1e-5, scaleY: 2e-5, squarenessRad: 0 }, 0.3);
    // A 1,000 ppm stretch in X and −500 ppm in Y about the centre move the corners of a 1,200 × 600 mm grid by
    // (0.6, 0.15) mm: half of each side times the stretch.
    expect(c.worstMm!).toBeCloseTo(Math.hypot(0.6, 0.15), 4);
    expect(c.verdict).toBe('out');
    // σ at a corner: (600 × 1e-5, 300 × 2e-5) mm, per axis the root mean square of the two.
    expect(c.uncertaintyMm!).toBeCloseTo(Math.hypot(600 * 1e-5, 300 * 2e-5) / Math.SQRT2, 6);
    expect(shapeCheck(nom, n, null, null, 0.3)).toEqual({ verdict: 'marginal', worstMm: null, uncertaintyMm: null, toleranceMm: 0.3 });
  });
});
