/**
 * The matching state the correspondence and fit stages share: each detection (image px) mapped into the bed lattice
 * frame (mm), the families its size fits, and the pairs (nominal bed mm, observed px) of an assignment.
 */
import type { Assignment } from '../correspond';
import { familiesForDiameter } from '../correspond';
import { GeometryInputError } from '../errors';
import type { Pt } from '../homography';
import type { Lattice } from '../lattice';
import type { AnalysisInput } from './input';

/** Fewest matched holes an analysis accepts. */
export const MIN_MATCHED = 8;

/** Throws the input error for too few matches. */
export function requireMatches(count: number): void {
  if (count < MIN_MATCHED) throw new GeometryInputError('holes', `only ${count} holes matched the pattern; at least ${MIN_MATCHED} are needed`);
}

/** The smaller of family fi's two pitches, mm. */
export const minPitchMm = (lat: Lattice, fi: number): number => Math.min(lat.families[fi]!.family.pitch.x, lat.families[fi]!.family.pitch.y);

/**
 * For each usable detection, the families whose hole diameter it may be: its diameter (px) times the local scale
 * `mmPerPx(i)` (mm per px), over the detector's size ratio `kappa` (detected / nominal), within relative `tol`.
 */
export function familiesBySize(inp: AnalysisInput, mmPerPx: (i: number) => number, tol: number, kappa: number): number[][] {
  const { detections: det, usable, lattice } = inp;
  const out: number[][] = [];
  for (let i = 0; i < det.n; i++) out.push(usable[i] ? familiesForDiameter(lattice, (det.dPx[i]! * mmPerPx(i)) / kappa, tol) : []);
  return out;
}

/** Writes each detection's image point (u, v) px mapped by `toBed` into `bedXY` (x0, y0, x1, …, mm). */
export function mapDetections(inp: AnalysisInput, bedXY: Float64Array, toBed: (u: number, v: number) => [number, number]): Float64Array {
  const det = inp.detections;
  for (let i = 0; i < det.n; i++) { const [x, y] = toBed(det.u[i]!, det.v[i]!); bedXY[2 * i] = x; bedXY[2 * i + 1] = y; }
  return bedXY;
}

/** Matched pairs of an assignment: nominal bed point (mm), observed image point (px), detection index. */
export interface MatchedPairs { src: Pt[]; dst: Pt[]; idx: number[] }

export function matchedPairs(inp: AnalysisInput, a: Assignment): MatchedPairs {
  const { detections: det, lattice: lat } = inp;
  const src: Pt[] = [], dst: Pt[] = [], idx: number[] = [];
  for (let i = 0; i < det.n; i++) { const p = a.posOf[i]!; if (p >= 0) { src.push([lat.positions[p]!.x, lat.positions[p]!.y]); dst.push([det.u[i]!, det.v[i]!]); idx.push(i); } }
  return { src, dst, idx };
}
