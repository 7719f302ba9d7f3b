/**
 * Levenberg–Marquardt for small dense least-squares problems (Marquardt 1963; Madsen, Nielsen & Tingleff, "Methods
 * for non-linear least squares problems", 2004, §3.2, with Marquardt's scaling of the damping by diag(JᵀWJ)).
 * The caller supplies the weighted cost and the normal equations (JᵀWJ, JᵀWr) at θ, so a problem can exploit its own
 * Jacobian structure (bedfit.ts) and add priors; no units of its own — θ and the residuals are the caller's.
 */
import { cholesky, choleskySolve } from './linalg';

export interface LeastSquaresProblem {
  /** Number of parameters. */
  n: number;
  /** Σ wᵢ rᵢ² (plus any penalty) at θ. */
  cost(theta: Float64Array): number;
  /** JᵀWJ (n × n, row-major) and JᵀWr at θ, for r = predicted − observed; the arrays may be reused between calls. */
  normalEquations(theta: Float64Array): { jtj: Float64Array; jtr: Float64Array };
}

export interface LevenbergMarquardtOptions {
  /** Most outer iterations (each builds the normal equations once). */
  maxIterations: number;
  /** Starting damping λ (default 1e-3). */
  lambda?: number;
  /** Stop when an accepted step lowers the cost by no more than this fraction of the cost (default 1e-14). */
  minRelativeGain?: number;
}

/** Damping tries per iteration before giving up (λ × 10 each). */
const TRIES = 8;
const MIN_LAMBDA = 1e-12;

/**
 * Minimises the problem's cost from θ (updated in place). A step solves (JᵀWJ + λ·diag(JᵀWJ)) δ = JᵀWr (an empty
 * diagonal entry is damped as 1) and is accepted when it does not raise the cost (λ / 10), else λ × 10.
 * @returns the final cost and the number of iterations run
 */
export function levenbergMarquardt(problem: LeastSquaresProblem, theta: Float64Array, options: LevenbergMarquardtOptions): { cost: number; iterations: number } {
  const n = problem.n;
  const minGain = options.minRelativeGain ?? 1e-14;
  let c0 = problem.cost(theta);
  let lambda = options.lambda ?? 1e-3;
  let it = 0;
  for (; it < options.maxIterations; it++) {
    const { jtj, jtr } = problem.normalEquations(theta);
    let accepted = false, gain = 0;
    for (let tries = 0; tries < TRIES; tries++) {
      const a = Float64Array.from(jtj);
      for (let i = 0; i < n; i++) a[i * n + i]! += lambda * (jtj[i * n + i]! || 1);
      if (!cholesky(a, n)) { lambda *= 10; continue; }
      const step = choleskySolve(a, n, jtr);
      const tn = Float64Array.from(theta);
      for (let i = 0; i < n; i++) tn[i]! -= step[i]!;
      const c1 = problem.cost(tn);
      if (c1 <= c0) { gain = c0 - c1; theta.set(tn); c0 = c1; lambda = Math.max(lambda / 10, MIN_LAMBDA); accepted = true; break; }
      lambda *= 10;
    }
    if (!accepted || gain <= minGain * (c0 + 1e-300)) { it++; break; }
  }
  return { cost: c0, iterations: it };
}
