/**
 * Measured distances between two positions (a steel tape between hole centres, or the machine's own coordinates
 * with the spindle jogged over both holes) combined with the reference square's estimate of the lattice's shape as
 * weighted information.
 *
 * Model. θ = (sx, sy, q): the lattice's true shape, L(θ) = composeAffine({ rotation 0, sx, sy, q }) mapping
 * lattice-frame mm onto true mm with the X axis kept fixed (affine.ts). The square gives θ_sq with covariance Σ_sq
 * (shape.ts). Distance i, between positions a and b whose centres the photo puts at p_a, p_b in the lattice frame
 * (mm), predicts f_i(θ) = |L(θ)(p_b − p_a)|; it is observed as m_i (mm) with variance s_i² = σ_i² + σ_photo,i², the
 * second term the two centres' own precision along the line between them. The estimate minimises
 *   (θ − θ_sq)ᵀ Σ_sq⁻¹ (θ − θ_sq) + Σ_i (m_i − f_i(θ))² / s_i²
 * by Gauss–Newton (f is nearly linear in θ); its covariance is (Σ_sq⁻¹ + Σ_i g_i g_iᵀ / s_i²)⁻¹ at the optimum,
 * g_i = ∂f_i/∂θ. One distance fixes the scale along its own direction; several directions fix the anisotropy
 * (scale X against scale Y) and, crosswise, the squareness. The residual m_i − f_i(θ̂) says how well the given
 * distances agree with the square and with each other.
 */
import { composeAffine, decomposeAffine } from './affine';
import type { MeasuredDistance, ReportDistance } from './contract';
import { GeometryInputError } from './errors';
import type { Lattice } from './lattice';
import { invertSpd } from './linalg';
import type { ShapeEstimate } from './shape';

/** One distance for the fit: the lattice-frame vector between the two centres (mm) and the measured length. */
export interface DistanceObservation {
  /** p_b − p_a, lattice frame, mm. */
  dLatticeMm: readonly [number, number];
  /** Measured length, mm, and its 1σ, mm. */
  mm: number;
  sigmaMm: number;
  /** 1σ of the photo's own measure of the same length (the two centres' precision), mm. */
  photoSigmaMm: number;
}

/** Shape terms (sx, sy, squareness rad) and their covariance (row-major 3 × 3). */
export interface ShapeTerms { theta: [number, number, number]; cov: number[] }

/** Length (mm) of lattice-frame vector d under shape θ, and its gradient with respect to θ. */
export function lengthUnderShape(theta: readonly number[], d: readonly [number, number]): { mm: number; grad: [number, number, number] } {
  const [sx, sy, q] = theta as [number, number, number];
  const L = composeAffine({ rotationRad: 0, scaleX: sx, scaleY: sy, squarenessRad: q });
  const x = L[0] * d[0] + L[1] * d[1], y = L[2] * d[0] + L[3] * d[1];
  const f = Math.hypot(x, y);
  // L = [[sx, −sy sin q], [0, sy cos q]].
  const s = Math.sin(q), c = Math.cos(q);
  return { mm: f, grad: [(x * d[0]) / f, (x * -s * d[1] + y * c * d[1]) / f, (x * -sy * c * d[1] + y * -sy * s * d[1]) / f] };
}

/** Information matrix of the square's estimate; a weak prior (σ = 1, i.e. 100 %) where its covariance is unusable. */
function priorInformation(cov: readonly number[]): Float64Array {
  const ok = cov.every((v) => Number.isFinite(v));
  const inv = ok ? invertSpd(Float64Array.from(cov), 3) : null;
  return inv ?? Float64Array.from([1, 0, 0, 0, 1, 0, 0, 0, 1]);
}

/**
 * Combines the square's shape estimate with measured distances (see the module header for the model).
 * @returns the combined terms and covariance, and each distance's predicted length (mm) from the square alone and
 *   after the combination
 */
export function combineShapeWithDistances(square: ShapeTerms, obs: readonly DistanceObservation[]): ShapeTerms & { squareMm: number[]; fittedMm: number[] } {
  const P = priorInformation(square.cov);
  const t0 = square.theta.map((v) => (Number.isFinite(v) ? v : 0)) as [number, number, number];
  const theta: [number, number, number] = [...t0];
  let info = Float64Array.from(P);
  for (let it = 0; it < 8; it++) {
    // Normal equations of the Gauss–Newton step: (P + Σ g gᵀ/s²) δ = −P (θ − θ_sq) + Σ g (m − f)/s².
    info = Float64Array.from(P);
    const rhs = [0, 0, 0];
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) rhs[a]! -= P[a * 3 + b]! * (theta[b]! - t0[b]!);
    for (const o of obs) {
      const { mm, grad } = lengthUnderShape(theta, o.dLatticeMm);
      const w = 1 / (o.sigmaMm ** 2 + o.photoSigmaMm ** 2);
      for (let a = 0; a < 3; a++) { rhs[a]! += grad[a]! * w * (o.mm - mm); for (let b = 0; b < 3; b++) info[a * 3 + b]! += grad[a]! * w * grad[b]!; }
    }
    const cov = invertSpd(info, 3);
    if (!cov) break;
    let step = 0;
    for (let a = 0; a < 3; a++) { let d = 0; for (let b = 0; b < 3; b++) d += cov[a * 3 + b]! * rhs[b]!; theta[a]! += d; step = Math.max(step, Math.abs(d)); }
    if (step < 1e-12) break;
  }
  const cov = invertSpd(info, 3);
  return {
    theta,
    cov: cov ? Array.from(cov) : [Infinity, 0, 0, 0, Infinity, 0, 0, 0, Infinity],
    squareMm: obs.map((o) => lengthUnderShape(t0, o.dLatticeMm).mm),
    fittedMm: obs.map((o) => lengthUnderShape(theta, o.dLatticeMm).mm),
  };
}

const norm = (label: string) => label.trim().replace(/\s+/g, ' ').toLowerCase();

/**
 * The square's shape estimate combined with the given distances, and the report's rows for them.
 * @param centreOf a position's centre in the lattice frame (mm) and its 1σ per axis (mm), or null when not seen
 * Throws GeometryInputError (field `distances.i.from|to`) for a label the pattern does not have.
 */
export function applyDistances(
  shape: ShapeEstimate, given: readonly MeasuredDistance[], lat: Lattice,
  centreOf: (pos: number) => { xyMm: [number, number]; sigmaMm: number } | null,
): { shape: ShapeEstimate; rows: ReportDistance[] } {
  const byLabel = new Map(lat.positions.map((q, i) => [norm(q.label), i]));
  const find = (label: string, field: string) => {
    const i = byLabel.get(norm(label));
    if (i === undefined) throw new GeometryInputError(field, `no position "${label}" in the pattern (write labels as the report does, e.g. "${lat.positions[0]?.label ?? 'insert A1'}")`);
    return i;
  };
  const obs: DistanceObservation[] = [], obsRow: number[] = [];
  const rows: ReportDistance[] = given.map((g, k) => {
    const a = find(g.from, `distances.${k}.from`), b = find(g.to, `distances.${k}.to`);
    const base = { from: g.from, to: g.to, mm: g.mm, sigmaMm: g.sigmaMm, squareMm: null, fittedMm: null, residualMm: null, residualSigmas: null };
    if (a === b) return { ...base, used: false, note: 'both ends are the same position' };
    const ca = centreOf(a), cb = centreOf(b);
    if (!ca || !cb) return { ...base, used: false, note: `${!ca ? lat.positions[a]!.label : lat.positions[b]!.label} was not seen in the photo` };
    obs.push({ dLatticeMm: [cb.xyMm[0] - ca.xyMm[0], cb.xyMm[1] - ca.xyMm[1]], mm: g.mm, sigmaMm: g.sigmaMm, photoSigmaMm: Math.hypot(ca.sigmaMm, cb.sigmaMm) });
    obsRow.push(k);
    return { ...base, used: true };
  });
  if (!obs.length) return { shape, rows };
  const t = shape.terms;
  const c = combineShapeWithDistances({ theta: [t.scaleX, t.scaleY, t.squarenessRad], cov: shape.cov }, obs);
  obs.forEach((o, j) => {
    const row = rows[obsRow[j]!]!;
    const res = o.mm - c.fittedMm[j]!;
    Object.assign(row, { squareMm: c.squareMm[j]!, fittedMm: c.fittedMm[j]!, residualMm: res, residualSigmas: res / Math.hypot(o.sigmaMm, o.photoSigmaMm) });
  });
  const L = composeAffine({ rotationRad: t.rotationRad, scaleX: c.theta[0], scaleY: c.theta[1], squarenessRad: c.theta[2] });
  const sd = (i: number) => Math.sqrt(Math.max(c.cov[i * 4]!, 0));
  return {
    shape: { ...shape, L, terms: decomposeAffine(L), cov: c.cov, sigma: { scaleX: sd(0), scaleY: sd(1), squarenessRad: sd(2) } },
    rows,
  };
}
