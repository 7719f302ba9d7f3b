import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { levenbergMarquardt, type LeastSquaresProblem } from '@/lib/geometry/levenberg-marquardt';

/** A problem r(θ) with Jacobian, in the shape the core's fits give it (cost and normal equations). */
function problemOf(n: number, residuals: (t: Float64Array) => number[], jacobian: (t: Float64Array) => number[][]): LeastSquaresProblem {
  return {
    n,
    cost: (t) => residuals(t).reduce((s, r) => s + r * r, 0),
    normalEquations: (t) => {
      const r = residuals(t), J = jacobian(t);
      const jtj = new Float64Array(n * n), jtr = new Float64Array(n);
      J.forEach((row, k) => { for (let i = 0; i < n; i++) { jtr[i]! += row[i]! * r[k]!; for (let j = 0; j < n; j++) jtj[i * n + j]! += row[i]! * row[j]!; } });
      return { jtj, jtr };
    },
  };
}

describe('Levenberg–Marquardt', () => {
  // Source: NIST Statistical Reference Datasets, nonlinear regression, Misra1a (lower difficulty): y = b1(1 − e^(−b2·x)),
  // 14 observations, certified b1 = 2.3894212918E+02, b2 = 5.5015643181E-04, residual sum of squares 1.2455138894E-01
  // (the last from memory), starts 1 (500, 1e-4) and 2 (250, 5e-4).
  const x = [77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0];
  const y = [10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.40, 75.47, 81.78];
  // r = model − observed, as the core's problems define it (the step is subtracted).
  const misra = problemOf(2, (t) => x.map((xi, k) => t[0]! * (1 - Math.exp(-t[1]! * xi)) - y[k]!), (t) => x.map((xi) => [1 - Math.exp(-t[1]! * xi), t[0]! * xi * Math.exp(-t[1]! * xi)]));

  for (const start of [[500, 1e-4], [250, 5e-4]] as const) {
    it(`reaches NIST's certified Misra1a estimates from start (${start[0]}, ${start[1]})`, () => {
      const theta = Float64Array.from(start);
      const out = levenbergMarquardt(misra, theta, { maxIterations: 500, minRelativeGain: 1e-15 });
      expect(theta[0]! / 2.3894212918e2 - 1).toBeCloseTo(0, 6);
      expect(theta[1]! / 5.5015643181e-4 - 1).toBeCloseTo(0, 6);
      expect(out.cost / 1.2455138894e-1 - 1).toBeCloseTo(0, 6);
    });
  }

  it('solves a linear least-squares problem as ml-matrix does', () => {
    // Independent library: ml-matrix solve (QR least squares) of A θ = b; LM on a linear problem ends at the same θ.
    const A = [[1, 0.5, -2], [2, 1, 0.3], [0.1, -1, 1], [3, 0.2, 0.7], [-1, 2, 0.4]];
    const b = [1, -2, 0.5, 3, 0.25];
    const lin = problemOf(3, (t) => A.map((row, k) => row[0]! * t[0]! + row[1]! * t[1]! + row[2]! * t[2]! - b[k]!), () => A);
    const theta = new Float64Array(3);
    levenbergMarquardt(lin, theta, { maxIterations: 50 });
    const ref = solve(new Matrix(A), Matrix.columnVector(b)).to1DArray();
    ref.forEach((v, i) => expect(theta[i]!).toBeCloseTo(v, 9));
  });

  it('never accepts a step that raises the cost', () => {
    // Rosenbrock's valley as least squares, r = (10(θ₁ − θ₀²), 1 − θ₀), minimum at (1, 1) (Rosenbrock 1960).
    const rosen = problemOf(2, (t) => [10 * (t[1]! - t[0]! ** 2), 1 - t[0]!], (t) => [[-20 * t[0]!, 10], [-1, 0]]);
    let last = Infinity;
    const watched: LeastSquaresProblem = { ...rosen, normalEquations: (t) => { const c = rosen.cost(t); expect(c).toBeLessThanOrEqual(last); last = c; return rosen.normalEquations(t); } };
    const theta = Float64Array.from([-1.2, 1]);
    levenbergMarquardt(watched, theta, { maxIterations: 200, minRelativeGain: 1e-15 });
    expect(theta[0]!).toBeCloseTo(1, 6);
    expect(theta[1]!).toBeCloseTo(1, 6);
  });
});
