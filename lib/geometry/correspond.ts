/**
 * Correspondence without manual pairing: which detected centre (image px) is which nominal position (bed mm).
 * 1. The reference square rectifies the photo to a metric frame (square frame, mm) — good enough near it.
 * 2. Lattice orientation: the 4-fold circular mean of neighbour directions of the main family, resolved to the
 *    quarter turn that puts the bed's front edge at the bottom of the photo (±45°).
 * 3. Lattice phase: circular vote of positions modulo the pitch; the whole-pitch shift is chosen by how many
 *    detections then land on valid nodes (ties: the one that centres the detections on the pattern).
 * 4. Assignment: each detection goes to the nearest valid node of a family its diameter fits, within a gate;
 *    one detection per node (the nearest wins); the rest are unmatched. Nothing is ever interpolated.
 */
import { MAX_COUNT_PER_AXIS } from './contract';
import { nearestNode, type Lattice } from './lattice';
import { applyH, mat3Mul, type Mat3 } from './linalg';

export interface Detections { u: Float64Array; v: Float64Array; dPx: Float64Array; n: number; conf: Float64Array }

const TAU = 2 * Math.PI;
/** Largest whole-pitch shift (in pitches) a placement search considers: ten times the most positions per axis. */
export const MAX_SHIFT_INDEX = 10 * MAX_COUNT_PER_AXIS;
/** Budget of detection pairs the neighbour-direction vote looks at (pairs beyond it are skipped). */
export const MAX_NEIGHBOUR_PAIRS = 2_000_000;

/** Families whose hole diameter a detection of diameter `dMm` could be (ratio within `tol`). */
export function familiesForDiameter(l: Lattice, dMm: number, tol: number): number[] {
  const out: number[] = [];
  l.families.forEach((f, i) => { if (Math.abs(Math.log(dMm / f.family.holeDiameter)) <= Math.log(1 + tol)) out.push(i); });
  return out;
}

function circularMeanPeak(angles: number[], bins = 48): number {
  const hist = new Float64Array(bins);
  for (const a of angles) hist[Math.floor((((a % TAU) + TAU) % TAU) / TAU * bins) % bins]!++;
  let best = 0, bestV = -1;
  for (let i = 0; i < bins; i++) { const v = hist[(i + bins - 1) % bins]! + 2 * hist[i]! + hist[(i + 1) % bins]!; if (v > bestV) { bestV = v; best = i; } }
  const centre = ((best + 0.5) / bins) * TAU;
  let s = 0, c = 0;
  for (const a of angles) {
    const d = Math.atan2(Math.sin(a - centre), Math.cos(a - centre));
    if (Math.abs(d) < (2.5 * TAU) / bins) { s += Math.sin(d); c += Math.cos(d); }
  }
  return centre + Math.atan2(s, c);
}

/** The initial map image px → bed mm (a homography) and how unique its whole-pitch shift is. */
export interface InitialMap { H: Mat3; /** Whole-pitch shifts that explain the detections about as well as the chosen one (1 = unique). */ tiedShifts: number }

type Family = Lattice['families'][number]['family'];

/** Detections (image px) rectified into the square frame (mm) by `sqInv`. */
function toSquareFrame(det: Detections, sqInv: Mat3): { sx: Float64Array; sy: Float64Array } {
  const sx = new Float64Array(det.n), sy = new Float64Array(det.n);
  for (let i = 0; i < det.n; i++) { const [x, y] = applyH(sqInv, det.u[i]!, det.v[i]!); sx[i] = x; sy[i] = y; }
  return { sx, sy };
}

/** The main family: the one with most usable candidate detections (at least 4), or null. */
function mainFamily(l: Lattice, n: number, usable: Uint8Array, famOf: number[][]): number | null {
  const votes = new Int32Array(l.families.length);
  for (let i = 0; i < n; i++) if (usable[i]) for (const f of famOf[i]!) votes[f]!++;
  let fm = 0;
  votes.forEach((v, i) => { if (v > votes[fm]!) fm = i; });
  return votes[fm]! < 4 ? null : fm;
}

/** One number per grid cell (gx, gy) of the neighbour search, distinct for cells within ±2²⁵ of the origin. */
const cellKey = (gx: number, gy: number): number => gx * 2 ** 26 + gy;

/**
 * Directions (rad, times 4 so that a lattice's four axes vote alike) of the pairs among detections `idx` (square
 * frame mm) that lie one pitch of `F` apart (±15 %), found through a grid hash of 1.3 pitch cells; at most
 * MAX_NEIGHBOUR_PAIRS pairs looked at.
 */
function neighbourDirections(idx: readonly number[], sx: Float64Array, sy: Float64Array, F: Family): number[] {
  const cell = Math.max(F.pitch.x, F.pitch.y) * 1.3;
  const grid = new Map<number, number[]>();
  for (const i of idx) { const key = cellKey(Math.floor(sx[i]! / cell), Math.floor(sy[i]! / cell)); (grid.get(key) ?? grid.set(key, []).get(key)!).push(i); }
  const dirs: number[] = [];
  const pitchXMm = F.pitch.x, pitchYMm = F.pitch.y;
  let pairs = 0;
  for (const i of idx) {
    const gx = Math.floor(sx[i]! / cell), gy = Math.floor(sy[i]! / cell);
    for (let ox = -1; ox <= 1; ox++) for (let oy = -1; oy <= 1; oy++) {
      for (const j of grid.get(cellKey(gx + ox, gy + oy)) ?? []) {
        if (j <= i || ++pairs > MAX_NEIGHBOUR_PAIRS) continue;
        const dx = sx[j]! - sx[i]!, dy = sy[j]! - sy[i]!, d = Math.hypot(dx, dy);
        if (Math.abs(d - pitchXMm) < 0.15 * pitchXMm || Math.abs(d - pitchYMm) < 0.15 * pitchYMm) dirs.push(4 * Math.atan2(dy, dx));
      }
    }
  }
  return dirs;
}

/** Of the four quarter turns of the lattice angle `th0` (rad, square frame), the one that keeps the bed's +X within ±45° of the image's +x (front edge at the bottom). */
function frontEdgeTurn(th0: number, sq: Mat3): number {
  const c0 = applyH(sq, 0, 0);
  let theta = th0, bestA = Infinity;
  for (let k = 0; k < 4; k++) {
    const t = th0 + (k * Math.PI) / 2;
    const p = applyH(sq, 10 * Math.cos(t), 10 * Math.sin(t));
    const a = Math.abs(Math.atan2(-(p[1] - c0[1]), p[0] - c0[0]));
    if (a < bestA) { bestA = a; theta = t; }
  }
  return theta;
}

/** Lattice phase (mm) per axis: the circular mean of origin − b modulo the pitch over detections `idx` (b: square frame turned into the bed's axes, mm). */
function latticePhase(idx: readonly number[], bx: Float64Array, by: Float64Array, F: Family): { tx0: number; ty0: number } {
  const ax: number[] = [], ay: number[] = [];
  for (const i of idx) { ax.push((TAU * (F.origin.x - bx[i]!)) / F.pitch.x); ay.push((TAU * (F.origin.y - by[i]!)) / F.pitch.y); }
  return { tx0: (circularMeanPeak(ax) / TAU) * F.pitch.x, ty0: (circularMeanPeak(ay) / TAU) * F.pitch.y };
}

/** The q-quantile of `a` (nearest rank below). */
function quantile(a: readonly number[], q: number): number { const s = [...a].sort((x, y) => x - y); return s[Math.min(s.length - 1, Math.max(0, Math.floor(q * (s.length - 1))))]!; }

/**
 * Whole-pitch shifts k that put lattice indices lo..hi of the detections inside 0..count − 1 (three about the
 * middle when they span more than the lattice). Detections mapped farther than MAX_SHIFT_INDEX pitches from the
 * lattice fit no placement (and k++ would stall past 2^53): no candidates, so no lattice is found.
 */
function shiftRange(lo: number, hi: number, count: number): number[] {
  if (!(Math.abs(lo) <= MAX_SHIFT_INDEX && Math.abs(hi) <= MAX_SHIFT_INDEX)) return [];
  let a = -lo, b = count - 1 - hi;
  if (a > b) { const m = Math.round((a + b) / 2); a = m - 1; b = m + 1; }
  const out: number[] = [];
  for (let k = a; k <= b; k++) out.push(k);
  return out;
}

/** Detections in the bed's axes (mm) with the main family and its phase, the input of the placement search. */
interface Phased { bx: Float64Array; by: Float64Array; idx: number[]; fm: number; tx0: number; ty0: number }

/**
 * The whole-pitch shift (and, for families of one size interleaved, the origin offset) under which most of a
 * sample of ≤ ~600 detections land within a quarter of the smallest pitch of a node of a family they may be (ties:
 * the shift that centres the detections on the pattern); the translation (mm) and how many shifts score within 2 %.
 */
function bestPlacement(l: Lattice, n: number, usable: Uint8Array, famOf: number[][], p: Phased): { tx: number; ty: number; tiedShifts: number } | null {
  const { bx, by, idx, fm, tx0, ty0 } = p;
  const F = l.families[fm]!.family;
  const ci: number[] = [], cj: number[] = [];
  for (const i of idx) { ci.push(Math.round((bx[i]! + tx0 - F.origin.x) / F.pitch.x)); cj.push(Math.round((by[i]! + ty0 - F.origin.y) / F.pitch.y)); }
  const ilo = quantile(ci, 0.01), ihi = quantile(ci, 0.99), jlo = quantile(cj, 0.01), jhi = quantile(cj, 0.99);
  const kxs = shiftRange(ilo, ihi, F.count.x), kys = shiftRange(jlo, jhi, F.count.y);
  if (!kxs.length || !kys.length) return null;
  const sample: number[] = [];
  const step = Math.max(1, Math.floor(n / 600));
  for (let i = 0; i < n; i += step) if (usable[i] && famOf[i]!.length) sample.push(i);
  const centreX = (F.count.x - 1) / 2 - (ilo + ihi) / 2, centreY = (F.count.y - 1) / 2 - (jlo + jhi) / 2;
  let best = { score: -1, off: Infinity, kx: 0, ky: 0, ox: 0, oy: 0 };
  const gate = 0.25 * Math.min(...l.families.map((f) => Math.min(f.family.pitch.x, f.family.pitch.y)));
  const maxCand = 2500;
  const kxL = kxs.length * kys.length > maxCand ? kxs.filter((_, i) => i % Math.ceil(kxs.length / 50) === 0) : kxs;
  const kyL = kxs.length * kys.length > maxCand ? kys.filter((_, i) => i % Math.ceil(kys.length / 50) === 0) : kys;
  const scores: number[] = [];
  // Families of one hole size interleaved (a staggered grid) vote into one phase histogram, each axis on its own,
  // so the phase found may mix one family's x with another's y: try the offsets between such families' origins too.
  for (const [ox, oy] of confusableOffsets(l, fm)) for (const kx of kxL) for (const ky of kyL) {
    const tx = tx0 + ox + kx * F.pitch.x, ty = ty0 + oy + ky * F.pitch.y;
    let score = 0;
    for (const i of sample) for (const f of famOf[i]!) { if (nearestNode(l, f, bx[i]! + tx, by[i]! + ty).dist < gate) { score++; break; } }
    const off = Math.hypot(kx - centreX, ky - centreY);
    scores.push(score);
    if (score > best.score || (score === best.score && off < best.off)) best = { score, off, kx, ky, ox, oy };
  }
  const tiedShifts = scores.filter((s) => s >= 0.98 * best.score).length;
  return { tx: tx0 + best.ox + best.kx * F.pitch.x, ty: ty0 + best.oy + best.ky * F.pitch.y, tiedShifts };
}

/**
 * Initial map image px → bed mm (a homography): square rectification (toSquareFrame), the main family, the lattice
 * turn from its neighbour directions (neighbourDirections, frontEdgeTurn), its phase (latticePhase) and the
 * whole-pitch shift (bestPlacement). `sq` maps the square frame (mm) to image px, `sqInv` back; `famOf[i]` lists
 * the families detection i may belong to. Null when no lattice is found.
 */
export function initialImageToBed(l: Lattice, det: Detections, usable: Uint8Array, famOf: number[][], sqInv: Mat3, sq: Mat3): InitialMap | null {
  const n = det.n;
  const { sx, sy } = toSquareFrame(det, sqInv);
  const fm = mainFamily(l, n, usable, famOf);
  if (fm === null) return null;
  const F = l.families[fm]!.family;
  const idx: number[] = [];
  for (let i = 0; i < n; i++) if (usable[i] && famOf[i]!.includes(fm)) idx.push(i);
  const dirs = neighbourDirections(idx, sx, sy, F);
  if (dirs.length < 3) return null;
  const theta = frontEdgeTurn(circularMeanPeak(dirs) / 4, sq);
  // square frame turned into the bed's axes: b = Rot(−θ)·s
  const cs = Math.cos(-theta), sn = Math.sin(-theta);
  const bx = new Float64Array(n), by = new Float64Array(n);
  for (let i = 0; i < n; i++) { bx[i] = cs * sx[i]! - sn * sy[i]!; by[i] = sn * sx[i]! + cs * sy[i]!; }
  const placed = bestPlacement(l, n, usable, famOf, { bx, by, idx, fm, ...latticePhase(idx, bx, by, F) });
  if (!placed) return null;
  // bed = Rot(−θ)·square + t ; image → square is sqInv.
  const rigid: Mat3 = [cs, -sn, placed.tx, sn, cs, placed.ty, 0, 0, 1];
  return { H: mat3Mul(rigid, sqInv), tiedShifts: placed.tiedShifts };
}

/**
 * Offsets (mm, bed frame) between family `fi`'s origin and those of families a detection cannot tell from it (hole
 * diameters within 15 %), reduced to ±half `fi`'s pitch on each axis, per axis and together; [0, 0] first.
 */
export function confusableOffsets(l: Lattice, fi: number): [number, number][] {
  const F = l.families[fi]!.family;
  const wrap = (v: number, p: number) => v - p * Math.round(v / p);
  const out: [number, number][] = [[0, 0]];
  const add = (x: number, y: number) => { if (!out.some(([a, b]) => Math.abs(a - x) < 1e-9 && Math.abs(b - y) < 1e-9)) out.push([x, y]); };
  for (const g of l.families) {
    if (g.family === F || Math.abs(Math.log(g.family.holeDiameter / F.holeDiameter)) > Math.log(1.15)) continue;
    const dx = wrap(g.family.origin.x - F.origin.x, F.pitch.x), dy = wrap(g.family.origin.y - F.origin.y, F.pitch.y);
    add(dx, 0); add(0, dy); add(dx, dy);
  }
  return out;
}

export interface Assignment { posOf: Int32Array; detOf: Int32Array; distMm: Float64Array }

/**
 * Assigns detections to nodes: `bedXY` holds each detection's predicted bed point (mm); `gateMm(fi)` the gate
 * radius for family fi; `ref(pos)` the point a position is expected at (nominal or nominal + panel move).
 */
export function assign(l: Lattice, bedXY: Float64Array, n: number, usable: Uint8Array, famOf: number[][], gateMm: (fi: number) => number, ref?: (pos: number) => [number, number]): Assignment {
  const posOf = new Int32Array(n).fill(-1), detOf = new Int32Array(l.positions.length).fill(-1), distMm = new Float64Array(n).fill(Infinity);
  const cand: { i: number; pos: number; d: number }[] = [];
  for (let i = 0; i < n; i++) {
    if (!usable[i]) continue;
    let bp = -1, bd = Infinity;
    for (const f of famOf[i]!) {
      const { pos } = nearestNode(l, f, bedXY[2 * i]!, bedXY[2 * i + 1]!);
      if (pos < 0) continue;
      const [rx, ry] = ref ? ref(pos) : [l.positions[pos]!.x, l.positions[pos]!.y];
      const d = Math.hypot(bedXY[2 * i]! - rx, bedXY[2 * i + 1]! - ry);
      if (d < gateMm(f) && d < bd) { bd = d; bp = pos; }
    }
    if (bp >= 0) cand.push({ i, pos: bp, d: bd });
  }
  cand.sort((a, b) => a.d - b.d);
  for (const c of cand) {
    if (detOf[c.pos]! >= 0) continue;
    detOf[c.pos] = c.i; posOf[c.i] = c.pos; distMm[c.i] = c.d;
  }
  return { posOf, detOf, distMm };
}
