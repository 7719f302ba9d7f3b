import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { analyzePoints } from '@/lib/geometry/analyze';
import { combineShapeWithDistances, lengthUnderShape, type DistanceObservation } from '@/lib/geometry/distances';
import { GeometryInputError } from '@/lib/geometry/errors';
import { buildLattice } from '@/lib/geometry/lattice';
import { PRESETS } from '@/lib/geometry/presets';
import { makeScene, type Scene, type SceneSpec } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';

const m6 = PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 1800, bedHeightMm: 1200, stripWidthMm: 200 });
const lat = buildLattice(patternToMm(m6));
const spec: SceneSpec = {
  pattern: m6, seed: 7, mmPerPx: 0.36, tiltDeg: 6, k1: -0.04, k2: 0.01, scaleX: 1.0008, scaleY: 0.9995, squarenessDeg: 0.03,
  panelShiftMm: 0.5, panelTurnDeg: 0.05, centreNoisePx: 0.06, cornerNoisePx: 0.1, missingFraction: 0.02,
  square: { sizeMm: 100, x: 500, y: 400, angleDeg: 5 },
};
const at = (col: number, row: number) => lat.positions.findIndex((q) => q.family === 0 && q.col === col && q.row === row);
const trueDistance = (sc: Scene, a: number, b: number) => Math.hypot(sc.truth.trueXY[2 * b]! - sc.truth.trueXY[2 * a]!, sc.truth.trueXY[2 * b + 1]! - sc.truth.trueXY[2 * a + 1]!);

describe('measured distances between positions', () => {
  it('brings the scale 1σ of a small square under 150 ppm with one ±0.2 mm distance over 1.7 m, within its stated σ of the truth', () => {
    const sc = makeScene(spec);
    sc.points.reference.cornerSigmaPx = 0.1;
    // Inserts 50 mm apart: column 0 to column 34 of one row is 1700 mm (nominal).
    const a = at(0, 5), b = at(34, 5);
    const given = { from: lat.positions[a]!.label, to: lat.positions[b]!.label, mm: trueDistance(sc, a, b) + 0.1, sigmaMm: 0.2 };
    const before = analyzePoints(sc.points, m6);
    const after = analyzePoints(sc.points, m6, { distances: [given] });
    expect(before.lattice.uncertainty.scaleX!).toBeGreaterThan(150e-6);
    expect(after.lattice.uncertainty.scaleX!).toBeLessThan(150e-6);
    // 0.2 mm over 1700 mm is 118 ppm: the combination cannot do better than the tape and the square together.
    const tape = 0.2 / 1700, sq = before.lattice.uncertainty.scaleX!;
    expect(after.lattice.uncertainty.scaleX!).toBeGreaterThan(0.95 / Math.sqrt(1 / tape ** 2 + 1 / sq ** 2));
    expect(Math.abs(after.lattice.scaleX! - sc.truth.scaleX)).toBeLessThan(3 * after.lattice.uncertainty.scaleX!);
    // A distance along X says nothing about scale Y.
    expect(after.lattice.uncertainty.scaleY! / before.lattice.uncertainty.scaleY!).toBeGreaterThan(0.9);
    const row = after.distances![0]!;
    expect(row.used).toBe(true);
    expect(Math.abs(row.residualSigmas!)).toBeLessThan(3);
  });

  it('constrains scale X, scale Y and squareness with distances in three directions', () => {
    const sc = makeScene(spec);
    sc.points.reference.cornerSigmaPx = 0.1;
    const pairs: [number, number][] = [[at(0, 1), at(34, 1)], [at(2, 0), at(2, 22)], [at(0, 0), at(34, 22)]];
    const distances = pairs.map(([a, b]) => ({ from: lat.positions[a]!.label, to: lat.positions[b]!.label, mm: trueDistance(sc, a, b), sigmaMm: 0.2 }));
    const before = analyzePoints(sc.points, m6), after = analyzePoints(sc.points, m6, { distances });
    for (const k of ['scaleX', 'scaleY', 'squarenessDeg'] as const) {
      expect(after.lattice.uncertainty[k]!).toBeLessThan(0.7 * before.lattice.uncertainty[k]!);
      expect(Math.abs(after.lattice[k]! - (k === 'squarenessDeg' ? sc.truth.squarenessDeg : sc.truth[k]))).toBeLessThan(3 * after.lattice.uncertainty[k]!);
    }
  });

  it('solves the normal equations of the combination as ml-matrix does', () => {
    // Prior θ_sq with a correlated covariance; three distances in different directions.
    const square = { theta: [1.0004, 0.9991, 3e-4] as [number, number, number], cov: [4e-8, 1e-8, 0, 1e-8, 9e-8, 2e-9, 0, 2e-9, 1e-7] };
    const obs: DistanceObservation[] = [
      { dLatticeMm: [1700, 3], mm: 1701.2, sigmaMm: 0.2, photoSigmaMm: 0.03 },
      { dLatticeMm: [-2, 1100], mm: 1098.9, sigmaMm: 0.3, photoSigmaMm: 0.03 },
      { dLatticeMm: [900, 800], mm: 1204.1, sigmaMm: 0.25, photoSigmaMm: 0.03 },
    ];
    const c = combineShapeWithDistances(square, obs);
    // Independent: linearise at the optimum, build Σ⁻¹ + Gᵀ W G and Gᵀ W r with ml-matrix.
    const S = new Matrix([square.cov.slice(0, 3), square.cov.slice(3, 6), square.cov.slice(6, 9)]);
    const G = new Matrix(obs.map((o) => lengthUnderShape(c.theta, o.dLatticeMm).grad));
    const W = Matrix.diag(obs.map((o) => 1 / (o.sigmaMm ** 2 + o.photoSigmaMm ** 2)));
    const r = Matrix.columnVector(obs.map((o) => o.mm - lengthUnderShape(c.theta, o.dLatticeMm).mm));
    const info = inverse(S).add(G.transpose().mmul(W).mmul(G));
    const post = inverse(info);
    for (let i = 0; i < 9; i++) expect(c.cov[i]! / post.get(Math.floor(i / 3), i % 3)).toBeCloseTo(1, 6);
    // Stationarity: Σ⁻¹ (θ̂ − θ_sq) = Gᵀ W (m − f(θ̂)).
    const lhs = inverse(S).mmul(Matrix.columnVector(c.theta.map((v, i) => v - square.theta[i]!)));
    const rhs = G.transpose().mmul(W).mmul(r);
    for (let i = 0; i < 3; i++) expect(lhs.get(i, 0)).toBeCloseTo(rhs.get(i, 0), 6);
  });

  it('names the field of a label the pattern does not have, and reports a distance to an unseen position as not used', () => {
    const sc = makeScene(spec);
    const bad = () => analyzePoints(sc.points, m6, { distances: [{ from: 'insert A1', to: 'insert ZZ99', mm: 100, sigmaMm: 0.2 }] });
    expect(bad).toThrow(GeometryInputError);
    try { bad(); } catch (e) { expect((e as GeometryInputError).field).toBe('distances.0.to'); }
    const unseen = lat.positions.findIndex((_, i) => !sc.truth.seen[i]);
    const r = analyzePoints(sc.points, m6, { distances: [{ from: lat.positions[at(0, 0)]!.label, to: lat.positions[unseen]!.label, mm: 500, sigmaMm: 0.2 }] });
    expect(r.distances![0]!.used).toBe(false);
    expect(r.distances![0]!.note).toContain('not seen');
  });
});
