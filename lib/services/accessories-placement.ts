/**
 * Accessory placement on a measured bed (pure; no database). An accessory is a set of pins or bolts at
 * offsets from its origin, in the accessory frame (mm, or lattice steps of the family the pin goes in), each
 * with its diameter and the hole family it enters. Placed with its origin on a bed position and turned by
 * 0/90/180/270°, each pin lands on a nominal hole; the minimax fit of lib/geometry/accessory.ts then says
 * whether a rigid placement exists with every pin inside its clearance around the hole's MEASURED centre.
 *
 * Frames: bed frame mm (origin front-left, +X right, +Y away from the operator); accessory frame mm, same
 * handedness, turned counter-clockwise by `turnDeg` about the accessory origin when placed.
 *
 * Clearance of a pin (radial, mm): `clearanceMm` when given; else `(throughHoleMm − diameterMm)/2` when the pin
 * is a bolt through a hole of the accessory into a threaded insert (the bolt centres on the insert); else
 * `(family hole diameter − diameterMm)/2` for a dowel or dog entering the bed's hole.
 */
import { z } from 'zod';
import { accessoryFit, type AccessoryFitResult, type AccessoryPin } from '@/lib/geometry/accessory';
import { HOLE_KINDS, type Family, type HoleKind, type Report, type ReportPosition } from '@/lib/geometry/contract';
import { clearanceHoleMm } from '@/lib/geometry/fits';
import type { PatternMm } from '@/lib/geometry/units';

export const TURNS = [0, 90, 180, 270] as const;
export type Turn = (typeof TURNS)[number];

const finite = z.number().finite();

export const AccessoryPinSchema = z.object({
  label: z.string().trim().min(1).max(40).optional(),
  /** Offset from the accessory origin, in `unit`. */
  x: finite.min(-5000).max(5000),
  y: finite.min(-5000).max(5000),
  unit: z.enum(['mm', 'steps']),
  /** The bed family the pin enters: a family id of the bed, or a hole kind (the bed's first family of it). */
  family: z.string().trim().min(1).max(40),
  /** Pin, dog or bolt diameter, mm. */
  diameterMm: finite.positive().max(200),
  /** Diameter of the accessory's own through hole for a bolt, mm. */
  throughHoleMm: finite.positive().max(250).optional(),
  /** Radial clearance given directly, mm (overrides the two above). */
  clearanceMm: finite.min(0).max(50).optional(),
});
export type AccessoryPinSpec = z.infer<typeof AccessoryPinSchema>;

export const AccessorySpecSchema = z.object({
  version: z.literal(1),
  pins: z.array(AccessoryPinSchema).min(1).max(400),
  /** Outline for drawing, in the accessory frame (mm); optional. */
  outline: z.object({ width: finite.positive(), height: finite.positive(), x: finite, y: finite }).optional(),
  /** A board's outline in lattice steps (drawn at the bed's pitch). */
  note: z.string().max(500).optional(),
});
export type AccessorySpec = z.infer<typeof AccessorySpecSchema>;

// -------------------------------------------------------------------------------------------------------------
// Presets of our own. Default clearance holes are ISO 273 "medium" for the bolt (lib/geometry/fits.ts).

const Fastener = z.string().trim().min(2).max(10).default('M8');
const Steps = z.coerce.number().int().min(1).max(60);

function bolt(fastener: string): { diameterMm: number; throughHoleMm: number } {
  const m = /^M(\d+(?:\.\d+)?)$/i.exec(fastener.replace(/\s+/g, ''));
  if (!m) throw new RangeError(`use a metric bolt such as M6 or M8 (got "${fastener}")`);
  return { diameterMm: Number(m[1]), throughHoleMm: clearanceHoleMm(fastener.toUpperCase(), 'medium') };
}

/** One setting of a preset, for forms. */
export interface PresetField { name: string; label: string; kind: 'int' | 'mm' | 'fastener'; default?: number | string }

export interface AccessoryPreset {
  id: string;
  name: string;
  description: string;
  fields: PresetField[];
  params: z.ZodType<Record<string, unknown>>;
  build(params: Record<string, unknown>): AccessorySpec;
}

const FenceParams = z.object({ spanSteps: Steps.default(4), fastener: Fastener });
const StopParams = z.object({ armXSteps: Steps.default(3), armYSteps: Steps.default(2), fastener: Fastener });
const CamParams = z.object({ fastener: Fastener });
const DogParams = z.object({ spanSteps: Steps.default(3), dogDiameterMm: z.coerce.number().positive().max(100).default(19.9) });
const BoardParams = z.object({
  widthMm: z.coerce.number().positive().max(5000),
  heightMm: z.coerce.number().positive().max(5000),
  pitchXMm: z.coerce.number().positive().max(1000),
  pitchYMm: z.coerce.number().positive().max(1000),
  fastener: Fastener,
});

/** Pins of a board carrying the bed's lattice: every node at least half a pitch in from its edges. */
function boardPins(p: z.infer<typeof BoardParams>): AccessorySpec {
  const nx = Math.max(1, Math.floor((p.widthMm - p.pitchXMm) / p.pitchXMm) + 1);
  const ny = Math.max(1, Math.floor((p.heightMm - p.pitchYMm) / p.pitchYMm) + 1);
  if (nx * ny > 400) throw new RangeError(`a board of ${nx} × ${ny} holes is more than the 400 pins an accessory may have; choose a smaller board`);
  const b = bolt(p.fastener);
  const pins: AccessoryPinSpec[] = [];
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) pins.push({ label: `${String.fromCharCode(65 + (i % 26))}${j + 1}`, x: i, y: j, unit: 'steps', family: 'threaded-insert', ...b });
  const mx = (p.widthMm - (nx - 1) * p.pitchXMm) / 2, my = (p.heightMm - (ny - 1) * p.pitchYMm) / 2;
  return { version: 1, pins, outline: { x: -mx, y: -my, width: p.widthMm, height: p.heightMm }, note: `${nx} × ${ny} bolt holes at the bed's pitch` };
}

export const ACCESSORY_PRESETS: AccessoryPreset[] = [
  {
    id: 'fence-two-bolt',
    fields: [{ name: 'spanSteps', label: 'Bolts apart, lattice steps', kind: 'int', default: 4 }, { name: 'fastener', label: 'Bolt', kind: 'fastener', default: 'M8' }],
    name: 'Fence, two bolts',
    description: 'A straight fence held by two bolts in inserts along X, a chosen number of steps apart.',
    params: FenceParams,
    build: (raw) => {
      const p = FenceParams.parse(raw), b = bolt(p.fastener);
      return { version: 1, pins: [{ label: 'left bolt', x: 0, y: 0, unit: 'steps', family: 'threaded-insert', ...b }, { label: 'right bolt', x: p.spanSteps, y: 0, unit: 'steps', family: 'threaded-insert', ...b }] };
    },
  },
  {
    id: 'stop-l-three-bolt',
    fields: [{ name: 'armXSteps', label: 'X arm, lattice steps', kind: 'int', default: 3 }, { name: 'armYSteps', label: 'Y arm, lattice steps', kind: 'int', default: 2 }, { name: 'fastener', label: 'Bolt', kind: 'fastener', default: 'M8' }],
    name: 'L-stop, three bolts',
    description: 'An L-shaped corner stop: a bolt at the corner, one along each arm.',
    params: StopParams,
    build: (raw) => {
      const p = StopParams.parse(raw), b = bolt(p.fastener);
      return {
        version: 1,
        pins: [
          { label: 'corner bolt', x: 0, y: 0, unit: 'steps', family: 'threaded-insert', ...b },
          { label: 'X arm bolt', x: p.armXSteps, y: 0, unit: 'steps', family: 'threaded-insert', ...b },
          { label: 'Y arm bolt', x: 0, y: p.armYSteps, unit: 'steps', family: 'threaded-insert', ...b },
        ],
      };
    },
  },
  {
    id: 'cam-clamp-base',
    fields: [{ name: 'fastener', label: 'Bolt', kind: 'fastener', default: 'M8' }],
    name: 'Cam clamp base',
    description: 'A small base for a cam clamp, two bolts on the diagonal of one lattice cell so it cannot turn.',
    params: CamParams,
    build: (raw) => {
      const p = CamParams.parse(raw), b = bolt(p.fastener);
      return { version: 1, pins: [{ label: 'rear bolt', x: 0, y: 0, unit: 'steps', family: 'threaded-insert', ...b }, { label: 'front bolt', x: 1, y: 1, unit: 'steps', family: 'threaded-insert', ...b }] };
    },
  },
  {
    id: 'dog-pair',
    fields: [{ name: 'spanSteps', label: 'Dogs apart, lattice steps', kind: 'int', default: 3 }, { name: 'dogDiameterMm', label: 'Dog diameter, mm', kind: 'mm', default: 19.9 }],
    name: 'Dog pair',
    description: 'Two bench dogs in dog holes along X, for a stop or a wedge clamp.',
    params: DogParams,
    build: (raw) => {
      const p = DogParams.parse(raw);
      return { version: 1, pins: [{ label: 'first dog', x: 0, y: 0, unit: 'steps', family: 'dog-hole', diameterMm: p.dogDiameterMm }, { label: 'second dog', x: p.spanSteps, y: 0, unit: 'steps', family: 'dog-hole', diameterMm: p.dogDiameterMm }] };
    },
  },
  {
    id: 'sacrificial-board',
    fields: [{ name: 'widthMm', label: 'Board width (X), mm', kind: 'mm' }, { name: 'heightMm', label: 'Board depth (Y), mm', kind: 'mm' }, { name: 'pitchXMm', label: 'Bed pitch X, mm', kind: 'mm' }, { name: 'pitchYMm', label: 'Bed pitch Y, mm', kind: 'mm' }, { name: 'fastener', label: 'Bolt', kind: 'fastener', default: 'M8' }],
    name: 'Sacrificial board',
    description: 'A board of the size you choose, drilled with the bed\'s own pattern and bolted through every hole.',
    params: BoardParams,
    build: (raw) => boardPins(BoardParams.parse(raw)),
  },
];

export const accessoryPresetById = (id: string): AccessoryPreset | undefined => ACCESSORY_PRESETS.find((p) => p.id === id);

// -------------------------------------------------------------------------------------------------------------
// Resolving pins on a bed

export class PlacementError extends Error {
  constructor(message: string, public readonly field?: string) {
    super(message);
    this.name = 'PlacementError';
  }
}

/** The bed family a pin enters: by id, else the first family of that hole kind. */
export function resolveFamily(pattern: PatternMm, family: string): Family | undefined {
  return pattern.families.find((f) => f.id === family)
    ?? (HOLE_KINDS.includes(family as HoleKind) ? pattern.families.find((f) => f.kind === family) : undefined);
}

export interface ResolvedPin {
  index: number;
  label: string;
  family: Family;
  /** Offset from the accessory origin, accessory frame, mm. */
  offsetMm: { x: number; y: number };
  clearanceMm: number;
}

/** Pins in mm with their bed family and radial clearance; throws PlacementError when the bed cannot take them. */
export function resolvePins(spec: AccessorySpec, pattern: PatternMm): ResolvedPin[] {
  return spec.pins.map((p, index) => {
    const family = resolveFamily(pattern, p.family);
    if (!family) throw new PlacementError(`This bed has no ${p.family} holes for ${p.label ?? `pin ${index + 1}`}.`, `pins.${index}.family`);
    const offsetMm = p.unit === 'steps' ? { x: p.x * family.pitch.x, y: p.y * family.pitch.y } : { x: p.x, y: p.y };
    const clearanceMm = p.clearanceMm ?? (p.throughHoleMm !== undefined ? (p.throughHoleMm - p.diameterMm) / 2 : (family.holeDiameter - p.diameterMm) / 2);
    return { index, label: p.label ?? `pin ${index + 1}`, family, offsetMm, clearanceMm };
  });
}

/** Report positions keyed `family|col|row`. */
export function indexPositions(report: Report): Map<string, ReportPosition> {
  return new Map(report.positions.map((p) => [`${p.family}|${p.col}|${p.row}`, p]));
}

const rotate = (v: { x: number; y: number }, deg: number) => {
  const a = (deg * Math.PI) / 180, c = Math.round(Math.cos(a)), s = Math.round(Math.sin(a));
  return { x: c * v.x - s * v.y, y: s * v.x + c * v.y };
};

export type Landing =
  | { ok: true; holes: ReportPosition[] }
  | { ok: false; reason: 'off-lattice' | 'unseen'; pin: number; message: string };

/** Which hole each pin lands on with the origin at `origin` (a report position) and a turn. */
export function landPins(pins: ResolvedPin[], byKey: Map<string, ReportPosition>, origin: { x: number; y: number }, turnDeg: Turn): Landing {
  const holes: ReportPosition[] = [];
  for (const p of pins) {
    const o = rotate(p.offsetMm, turnDeg);
    const x = origin.x + o.x, y = origin.y + o.y;
    const f = p.family;
    const col = Math.round((x - f.origin.x) / f.pitch.x), row = Math.round((y - f.origin.y) / f.pitch.y);
    const hole = byKey.get(`${f.id}|${col}|${row}`);
    const tol = Math.min(1, 0.05 * Math.min(f.pitch.x, f.pitch.y));
    if (!hole || Math.hypot(hole.nominal.x - x, hole.nominal.y - y) > tol) {
      return { ok: false, reason: 'off-lattice', pin: p.index, message: `Pin “${p.label}” does not land on a ${f.label ?? f.kind} hole of the bed there.` };
    }
    if (!hole.measured) return { ok: false, reason: 'unseen', pin: p.index, message: `Pin “${p.label}” lands on ${hole.label}, which the photo did not show: pick another origin, or map every position and turn to see where it fits.` };
    holes.push(hole);
  }
  return { ok: true, holes };
}

/**
 * The position to offer first for the accessory's origin: of those where, unturned, every pin lands on a hole the
 * photo measured, the one nearest the bed's front-left corner (bed mm); null when there is none (or the bed cannot
 * take the pins). So a first "check the fit" is not refused for a hidden hole.
 */
export function firstMeasuredOrigin(spec: AccessorySpec, pattern: PatternMm, report: Report): string | null {
  let pins: ResolvedPin[];
  try {
    pins = resolvePins(spec, pattern);
  } catch (e) {
    if (e instanceof PlacementError) return null;
    throw e;
  }
  const first = pins[0];
  if (!first) return null;
  const byKey = indexPositions(report);
  const candidates = report.positions
    .filter((p) => p.family === first.family.id && p.measured)
    .sort((a, b) => Math.hypot(a.nominal.x, a.nominal.y) - Math.hypot(b.nominal.x, b.nominal.y));
  return candidates.find((p) => landPins(pins, byKey, p.nominal, 0).ok)?.label ?? null;
}

export interface PlacementResult {
  at: string;
  turnDeg: Turn;
  fits: boolean;
  /** Smallest spare clearance over the pins at the best placement, mm; negative: binds by that much. */
  marginMm: number;
  /** The best placement's shift (mm) and extra turn (degrees, counter-clockwise) from the nominal one. */
  placement: AccessoryFitResult['placement'];
  pins: { index: number; label: string; hole: string; clearanceMm: number; errorMm: number; slackMm: number; binding: boolean; bindsByMm: number }[];
  /** Labels of the pins that decide the margin. */
  binding: string[];
}

/** The minimax fit of the accessory with its origin on position `at` (a report label) and a turn. */
export function placeAccessory(spec: AccessorySpec, pattern: PatternMm, report: Report, at: string, turnDeg: Turn, searchDeg = 1): PlacementResult {
  const pins = resolvePins(spec, pattern);
  const origin = report.positions.find((p) => p.label === at);
  if (!origin) throw new PlacementError(`There is no position ${at} on this bed.`, 'at');
  const landing = landPins(pins, indexPositions(report), origin.nominal, turnDeg);
  if (!landing.ok) throw new PlacementError(landing.message, 'at');
  const fitPins: AccessoryPin[] = pins.map((p) => ({ x: p.offsetMm.x, y: p.offsetMm.y, clearanceMm: p.clearanceMm, label: p.label }));
  const r = accessoryFit({ pins: fitPins, targets: landing.holes.map((h) => h.measured!), at: origin.nominal, turnDeg, searchDeg });
  return {
    at,
    turnDeg,
    fits: r.fits,
    marginMm: r.marginMm,
    placement: r.placement,
    pins: r.pins.map((q) => ({
      index: q.index, label: pins[q.index]!.label, hole: landing.holes[q.index]!.label, clearanceMm: q.clearanceMm,
      errorMm: q.errorMm, slackMm: q.slackMm, binding: q.binding, bindsByMm: Math.max(0, -q.slackMm),
    })),
    binding: r.binding.map((k) => pins[k]!.label),
  };
}

// -------------------------------------------------------------------------------------------------------------
// The map of every position and turn: a cheaper minimax of the same function, checked against the full fit
// in tests. For fixed θ the largest excess is convex in the shift; nested golden sections of 32 steps each
// bracket the optimum to well under 1 µm over the few-mm search span.

const PHI = (Math.sqrt(5) - 1) / 2;
function golden(f: (x: number) => number, a: number, b: number, iters: number): { x: number; v: number } {
  let c = b - PHI * (b - a), d = a + PHI * (b - a), fc = f(c), fd = f(d);
  for (let i = 0; i < iters; i++) {
    if (fc < fd) { b = d; d = c; fd = fc; c = b - PHI * (b - a); fc = f(c); }
    else { a = c; c = d; fc = fd; d = a + PHI * (b - a); fd = f(d); }
  }
  const x = (a + b) / 2;
  return { x, v: f(x) };
}

/**
 * Least largest pin excess, mm (−margin), over shifts and turns within ±searchDeg. The turn is searched by
 * golden section around the least-squares turn (Kabsch: the angle of Σ oₖ × qₖ over Σ oₖ · qₖ, centred),
 * clipped to the range; for each turn the shift by nested golden sections.
 */
export function quickMinimaxExcess(offsets: { x: number; y: number; c: number }[], targets: { x: number; y: number }[], at: { x: number; y: number }, turnDeg: number, searchDeg = 1): number {
  const n = offsets.length;
  const qx = new Float64Array(n), qy = new Float64Array(n), cc = new Float64Array(n);
  for (let k = 0; k < n; k++) cc[k] = offsets[k]!.c;
  const cmax = Math.max(...cc);
  const base = (turnDeg * Math.PI) / 180;
  const g = (tx: number, ty: number) => {
    let m = -Infinity;
    for (let k = 0; k < n; k++) { const v = Math.hypot(tx - qx[k]!, ty - qy[k]!) - cc[k]!; if (v > m) m = v; }
    return m;
  };
  const atTheta = (th: number) => {
    const c = Math.cos(base + th), s = Math.sin(base + th);
    let lo = Infinity, hi = -Infinity;
    for (let k = 0; k < n; k++) {
      const o = offsets[k]!, h = targets[k]!;
      const x = h.x - (at.x + c * o.x - s * o.y), y = h.y - (at.y + s * o.x + c * o.y);
      qx[k] = x; qy[k] = y;
      if (x < lo) lo = x; if (y < lo) lo = y; if (x > hi) hi = x; if (y > hi) hi = y;
    }
    const a0 = lo - cmax - 1, a1 = hi + cmax + 1;
    return golden((tx) => golden((ty) => g(tx, ty), a0, a1, 26).v, a0, a1, 26).v;
  };
  if (n === 1) return atTheta(0);
  // least-squares turn of the offsets (turned by `turnDeg`) onto the targets, both centred
  let ox = 0, oy = 0, hx = 0, hy = 0;
  const cb = Math.cos(base), sb = Math.sin(base);
  const ro = offsets.map((o) => ({ x: at.x + cb * o.x - sb * o.y, y: at.y + sb * o.x + cb * o.y }));
  for (let k = 0; k < n; k++) { ox += ro[k]!.x; oy += ro[k]!.y; hx += targets[k]!.x; hy += targets[k]!.y; }
  ox /= n; oy /= n; hx /= n; hy /= n;
  let cross = 0, dot = 0;
  for (let k = 0; k < n; k++) {
    const ax = ro[k]!.x - ox, ay = ro[k]!.y - oy, bx = targets[k]!.x - hx, by = targets[k]!.y - hy;
    cross += ax * by - ay * bx; dot += ax * bx + ay * by;
  }
  const range = (searchDeg * Math.PI) / 180;
  const th0 = Math.max(-range, Math.min(range, Math.atan2(cross, dot)));
  const h = Math.max(range / 4, 1e-6);
  const r = golden(atTheta, Math.max(-range, th0 - h), Math.min(range, th0 + h), 14);
  return Math.min(atTheta(th0), r.v);
}

export interface MapCell {
  at: string;
  turnDeg: Turn;
  status: 'fits' | 'binds' | 'unseen';
  /** −(least largest excess), mm; null when a pin's hole was not seen. */
  marginMm: number | null;
}

/**
 * Every position of the first pin's family as the accessory origin, at every turn: fits, binds (with the
 * margin) or unseen; placements where a pin misses the lattice (off the bed, into a channel) are left out.
 */
export function placementMap(spec: AccessorySpec, pattern: PatternMm, report: Report, opts: { turns?: readonly Turn[]; searchDeg?: number; maxCells?: number } = {}): { cells: MapCell[]; truncated: boolean } {
  const pins = resolvePins(spec, pattern);
  const byKey = indexPositions(report);
  const originFamily = pins[0]!.family.id;
  const offsets = pins.map((p) => ({ x: p.offsetMm.x, y: p.offsetMm.y, c: p.clearanceMm }));
  const cells: MapCell[] = [];
  const maxCells = opts.maxCells ?? 20_000;
  let truncated = false;
  for (const turnDeg of opts.turns ?? TURNS) {
    for (const origin of report.positions) {
      if (origin.family !== originFamily) continue;
      const landing = landPins(pins, byKey, origin.nominal, turnDeg);
      if (!landing.ok) {
        if (landing.reason === 'unseen') cells.push({ at: origin.label, turnDeg, status: 'unseen', marginMm: null });
        continue;
      }
      if (cells.length >= maxCells) { truncated = true; break; }
      const excess = quickMinimaxExcess(offsets, landing.holes.map((h) => h.measured!), origin.nominal, turnDeg, opts.searchDeg ?? 1);
      cells.push({ at: origin.label, turnDeg, status: excess <= 0 ? 'fits' : 'binds', marginMm: -excess });
    }
  }
  return { cells, truncated };
}

// -------------------------------------------------------------------------------------------------------------
// A board measured in its own check, against a bed measured in another

export interface BoardOnBedResult extends Omit<PlacementResult, 'at' | 'turnDeg'> {
  /** Bed label the board's first hole lands on. */
  anchor: string;
  /** Board holes with no partner on the bed (off the bed, or unseen there). */
  unpaired: string[];
  paired: number;
}

/**
 * Does the board drop onto the bed? Each measured board hole (its own check, board frame mm) is paired with
 * the bed hole `dc` columns and `dr` rows away from its own cell (same hole kind), and one rigid placement
 * must put every board hole within its tolerance of the bed hole's measured centre. The board's holes are
 * taken relative to the nominal of the board's position nearest its origin.
 */
export function boardOnBed(board: Report, bed: Report, bedPattern: PatternMm, boardPattern: PatternMm, opts: { dc?: number; dr?: number; searchDeg?: number } = {}): BoardOnBedResult {
  const dc = opts.dc ?? 0, dr = opts.dr ?? 0;
  const byKey = indexPositions(bed);
  const famFor = new Map(boardPattern.families.map((f) => [f.id, bedPattern.families.find((g) => g.id === f.id && g.kind === f.kind) ?? bedPattern.families.find((g) => g.kind === f.kind)]));
  const measured = board.positions.filter((p) => p.measured);
  if (measured.length === 0) throw new PlacementError('The board\'s check found none of its holes.');
  const first = [...board.positions].sort((a, b) => a.row - b.row || a.col - b.col)[0]!;
  const pins: AccessoryPin[] = [], targets: { x: number; y: number }[] = [], labels: string[] = [], holes: string[] = [];
  const unpaired: string[] = [];
  for (const p of measured) {
    const f = famFor.get(p.family);
    const q = f ? byKey.get(`${f.id}|${p.col + dc}|${p.row + dr}`) : undefined;
    if (!q || !q.measured) { unpaired.push(p.label); continue; }
    pins.push({ x: p.measured!.x - first.nominal.x, y: p.measured!.y - first.nominal.y, clearanceMm: p.toleranceMm, label: p.label });
    targets.push(q.measured);
    labels.push(p.label); holes.push(q.label);
  }
  const ff = famFor.get(first.family);
  const anchor = ff ? byKey.get(`${ff.id}|${first.col + dc}|${first.row + dr}`) : undefined;
  if (pins.length === 0 || !anchor) throw new PlacementError('None of the board\'s holes meets a measured hole of the bed at that offset.');
  const r = accessoryFit({ pins, targets, at: anchor.nominal, turnDeg: 0, searchDeg: opts.searchDeg });
  return {
    anchor: anchor.label,
    fits: r.fits,
    marginMm: r.marginMm,
    placement: r.placement,
    pins: r.pins.map((q) => ({ index: q.index, label: labels[q.index]!, hole: holes[q.index]!, clearanceMm: q.clearanceMm, errorMm: q.errorMm, slackMm: q.slackMm, binding: q.binding, bindsByMm: Math.max(0, -q.slackMm) })),
    binding: r.binding.map((k) => labels[k]!),
    unpaired,
    paired: pins.length,
  };
}
