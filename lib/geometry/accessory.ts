/**
 * Accessory fit: an accessory carries pins or bolts at offsets (accessory frame, mm), each with a radial
 * clearance (mm). Placed with its origin at a bed point (bed frame, mm) and a turn of 0/90/180/270°, does a
 * rigid placement (small turn θ about the origin, shift t) exist with every pin inside its clearance around
 * the hole it enters (measured positions, bed mm)? We minimise the largest pin excess
 *   F(θ, t) = maxₖ (‖R(turn + θ)·oₖ + origin + t − hₖ‖ − cₖ)
 * (a minimax fit): for fixed θ, F is convex in t and is minimised by nested golden-section searches; θ by a
 * scan and a golden-section refinement over ±searchDeg. Margin = −F* (positive: fits with that much to spare).
 * Binding pins are those within 1 µm of the worst.
 */
import type { Report } from './contract';

export interface AccessoryPin { x: number; y: number; clearanceMm: number; label?: string }
export interface AccessoryFitInput {
  pins: AccessoryPin[];
  /** The real (measured) centre of the hole each pin enters, bed mm. */
  targets: { x: number; y: number }[];
  /** Where the accessory's origin is placed nominally (bed mm) and its turn. */
  at: { x: number; y: number };
  turnDeg?: 0 | 90 | 180 | 270;
  /** Largest extra turn searched, degrees (default 1). */
  searchDeg?: number;
}
export interface AccessoryFitResult {
  fits: boolean;
  /** Smallest spare clearance over the pins at the best placement, mm (negative: binds by that much). */
  marginMm: number;
  /** Best placement relative to the nominal one: shift (mm) and extra turn (degrees, counter-clockwise). */
  placement: { dx: number; dy: number; rotationDeg: number };
  pins: { index: number; label?: string; errorMm: number; clearanceMm: number; slackMm: number; binding: boolean }[];
  binding: number[];
}

const PHI = (Math.sqrt(5) - 1) / 2;

function golden(f: (x: number) => number, a: number, b: number, iters: number): { x: number; v: number } {
  let c = b - PHI * (b - a), d = a + PHI * (b - a);
  let fc = f(c), fd = f(d);
  for (let i = 0; i < iters; i++) {
    if (fc < fd) { b = d; d = c; fd = fc; c = b - PHI * (b - a); fc = f(c); }
    else { a = c; c = d; fc = fd; d = a + PHI * (b - a); fd = f(d); }
  }
  const x = (a + b) / 2;
  return { x, v: f(x) };
}

/** Pin excess at a placement. */
export function pinExcess(inp: AccessoryFitInput, thetaRad: number, tx: number, ty: number): number[] {
  const base = ((inp.turnDeg ?? 0) * Math.PI) / 180 + thetaRad;
  const c = Math.cos(base), s = Math.sin(base);
  return inp.pins.map((p, k) => {
    const h = inp.targets[k]!;
    return Math.hypot(inp.at.x + c * p.x - s * p.y + tx - h.x, inp.at.y + s * p.x + c * p.y + ty - h.y) - p.clearanceMm;
  });
}

function bestShift(inp: AccessoryFitInput, thetaRad: number): { tx: number; ty: number; v: number } {
  const base = ((inp.turnDeg ?? 0) * Math.PI) / 180 + thetaRad;
  const c = Math.cos(base), s = Math.sin(base);
  const qx = inp.pins.map((p, k) => inp.targets[k]!.x - (inp.at.x + c * p.x - s * p.y));
  const qy = inp.pins.map((p, k) => inp.targets[k]!.y - (inp.at.y + s * p.x + c * p.y));
  const g = (tx: number, ty: number) => { let m = -Infinity; for (let k = 0; k < qx.length; k++) m = Math.max(m, Math.hypot(tx - qx[k]!, ty - qy[k]!) - inp.pins[k]!.clearanceMm); return m; };
  const span = Math.max(...qx.map(Math.abs), ...qy.map(Math.abs)) + Math.max(...inp.pins.map((p) => p.clearanceMm)) + 1;
  const x0 = Math.min(...qx) - span, x1 = Math.max(...qx) + span, y0 = Math.min(...qy) - span, y1 = Math.max(...qy) + span;
  let bestTy = 0;
  const r = golden((tx) => { const inner = golden((ty) => g(tx, ty), y0, y1, 70); bestTy = inner.x; return inner.v; }, x0, x1, 70);
  const inner = golden((ty) => g(r.x, ty), y0, y1, 70);
  void bestTy;
  return { tx: r.x, ty: inner.x, v: inner.v };
}

/** Minimax rigid placement of an accessory's pins over their holes. */
export function accessoryFit(inp: AccessoryFitInput): AccessoryFitResult {
  if (inp.pins.length === 0 || inp.targets.length !== inp.pins.length) throw new RangeError('accessory fit needs one target hole per pin');
  const range = ((inp.searchDeg ?? 1) * Math.PI) / 180;
  let best = { th: 0, ...bestShift(inp, 0) };
  if (inp.pins.length > 1) {
    const steps = 40;
    for (let i = 0; i <= steps; i++) {
      const th = -range + (2 * range * i) / steps;
      const r = bestShift(inp, th);
      if (r.v < best.v) best = { th, ...r };
    }
    const h = (2 * range) / steps;
    const g = golden((th) => bestShift(inp, th).v, best.th - h, best.th + h, 50);
    const r = bestShift(inp, g.x);
    if (r.v <= best.v) best = { th: g.x, ...r };
  }
  const ex = pinExcess(inp, best.th, best.tx, best.ty);
  const worst = Math.max(...ex);
  const binding = ex.map((e, k) => (e > worst - 1e-3 ? k : -1)).filter((k) => k >= 0);
  return {
    fits: worst <= 0, marginMm: -worst,
    placement: { dx: best.tx, dy: best.ty, rotationDeg: (best.th * 180) / Math.PI },
    pins: inp.pins.map((p, k) => ({ index: k, label: p.label, errorMm: ex[k]! + p.clearanceMm, clearanceMm: p.clearanceMm, slackMm: -ex[k]!, binding: binding.includes(k) })),
    binding,
  };
}

/**
 * A sacrificial board measured on its own against the bed: each board hole (a report position, measured) must
 * line up with the bed position of the same label within the board hole's tolerance.
 */
export function boardFit(board: Report, bed: Report, opts: { searchDeg?: number } = {}): AccessoryFitResult & { unpaired: string[] } {
  const bedBy = new Map(bed.positions.filter((p) => p.measured).map((p) => [p.label, p]));
  const pins: AccessoryPin[] = [], targets: { x: number; y: number }[] = [];
  const unpaired: string[] = [];
  for (const p of board.positions) {
    if (!p.measured) continue;
    const q = bedBy.get(p.label);
    if (!q) { unpaired.push(p.label); continue; }
    pins.push({ x: p.measured.x, y: p.measured.y, clearanceMm: p.toleranceMm, label: p.label });
    targets.push(q.measured!);
  }
  return { ...accessoryFit({ pins, targets, at: { x: 0, y: 0 }, turnDeg: 0, searchDeg: opts.searchDeg }), unpaired };
}
