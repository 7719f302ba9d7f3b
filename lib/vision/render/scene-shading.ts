/**
 * How a rendered bed point looks: linear RGB reflectance (0..1 per channel) of bed point (X, Y) mm, from the top:
 * an object lying on the bed, the target's sheet (ink or paper), a T-track channel, a disc (insert, dog hole, screw,
 * dust), a panel seam, else the board (MDF or plywood, its tone drifting and per panel).
 * Bed frame: mm, origin front-left, +X right, +Y away.
 */
import { targetInkAt } from '../target';
import { valueNoise } from './rng';
import type { BedCover } from './scene-cover';
import type { Disc, DiscGrid } from './scene-discs';
import type { ShiftedPanel } from './scene-errors';
import type { SceneOptions } from './scene';

export interface ShadingInputs {
  opts: Pick<SceneOptions, 'material' | 'targetStyle' | 'seed'>;
  /** Outer size of the square, mm. */
  squareMm: number;
  panels: ShiftedPanel[];
  cover: BedCover;
  discs: DiscGrid;
  /** Direction the light comes from over the bed, radians (shades the dog holes' walls). */
  lightAngleRad: number;
}

/** Writes linear RGB reflectance of bed point (X, Y) mm into out[0..2]. */
export type Shader = (X: number, Y: number, out: Float64Array) => void;

/** Reflectance of a black object lying on the bed when the options give none. */
const OCCLUDER_TONE = 0.06;
/** Half-width of the dark line at a panel's edge, mm. */
const SEAM_HALF_MM = 0.25;

const set = (out: Float64Array, r: number, g: number, b: number) => {
  out[0] = r;
  out[1] = g;
  out[2] = b;
};

/** The shader of a scene (deterministic; the noise is salted by the seed). */
export function makeShader(s: ShadingInputs): Shader {
  const { cover, discs, panels, squareMm: S, lightAngleRad } = s;
  const salt = s.opts.seed & 0xffff;
  const plain = s.opts.targetStyle === 'plain';
  const board = boardShader(s.opts.material, panels, salt);
  return (X, Y, out) => {
    const oc = cover.occluders.length ? cover.occluderAt(X, Y) : undefined;
    if (oc) {
      const t = oc.tone ?? OCCLUDER_TONE;
      set(out, t, t, t * 1.05);
      return;
    }
    const tp = cover.sheetAt(X, Y);
    if (tp) {
      shadeSheet(tp, S, plain, X, Y, salt, out);
      return;
    }
    const ch = cover.channelAt(X, Y);
    if (ch >= 0) {
      shadeChannel(cover.channels[ch]!, X, Y, salt, out);
      return;
    }
    const l = discs.at(X, Y);
    if (l) for (const d of l) if (shadeDisc(d, X - d.x, Y - d.y, lightAngleRad, out)) return;
    if (onSeam(panels, X, Y)) {
      set(out, 0.1, 0.08, 0.06);
      return;
    }
    board(X, Y, out);
  };
}

/** The sheet at square-frame point `tp` (mm): black ink (the framed target, or the plain filled square) or paper. */
function shadeSheet(tp: [number, number], S: number, plain: boolean, X: number, Y: number, salt: number, out: Float64Array): void {
  const ink = plain ? tp[0] >= 0 && tp[1] >= 0 && tp[0] <= S && tp[1] <= S : targetInkAt(tp[0], tp[1], S);
  if (ink) set(out, 0.035, 0.035, 0.04);
  else {
    const p = 0.82 + 0.02 * valueNoise(X / 3, Y / 3, salt + 9);
    set(out, p, p, p * 0.98);
  }
}

/** A T-track channel running along its longer side: the dark slot in the middle, a dark lip at the sides, aluminium between. */
function shadeChannel(c: { x: number; y: number; width: number; height: number }, X: number, Y: number, salt: number, out: Float64Array): void {
  const along = c.width >= c.height;
  const w = along ? c.height : c.width;
  const off = along ? Y - (c.y + c.height / 2) : X - (c.x + c.width / 2);
  const slotHalf = 0.22 * w;
  if (Math.abs(off) < slotHalf) set(out, 0.04, 0.04, 0.045);
  else if (Math.abs(off) > w / 2 - 0.6) set(out, 0.25, 0.25, 0.26);
  else {
    const a = 0.55 + 0.03 * valueNoise(along ? X / 20 : X / 0.3, along ? Y / 0.3 : Y / 20, salt + 5);
    set(out, a, a, a * 1.02);
  }
}

/**
 * Paints disc `d` at offset (dx, dy) mm from its centre and returns true, or returns false where the point lies
 * outside what it paints (beyond its outer radius, or outside a speck's irregular outline).
 */
function shadeDisc(d: Disc, dx: number, dy: number, lightAngleRad: number, out: Float64Array): boolean {
  const rho = Math.hypot(dx, dy);
  if (rho > d.outer) return false;
  switch (d.kind) {
    case 'insert': {
      if (rho <= d.r) {
        const thread = 0.05 + 0.012 * Math.cos((rho / 1.25) * 2 * Math.PI); // M8 thread crests, 1.25 mm pitch
        set(out, thread, thread * 0.97, thread * 0.95);
      } else {
        const brass = d.tone < 0.5;
        const m = 0.62 + 0.06 * Math.cos((rho - d.r) * 3 + d.angle);
        if (brass) set(out, m * 1.05, m * 0.85, m * 0.5);
        else set(out, m, m, m * 1.03);
      }
      return true;
    }
    case 'dog': {
      const q = rho / d.r;
      const th = Math.atan2(dy, dx);
      const v = 0.035 + 0.05 * q * q * (0.6 + 0.4 * Math.cos(th - lightAngleRad));
      set(out, v, v * 0.95, v * 0.9);
      return true;
    }
    case 'screw': {
      const ang = Math.atan2(dy, dx) - d.angle;
      const along = Math.abs(rho * Math.cos(ang));
      const across = Math.abs(rho * Math.sin(ang));
      const cross = (along < 2.4 && across < 0.5) || (across < 2.4 && along < 0.5);
      if (cross) set(out, 0.08, 0.08, 0.085);
      else if (rho > d.r - 0.3) set(out, 0.3, 0.3, 0.3);
      else {
        const m = 0.5 + 0.05 * Math.cos(rho * 2);
        set(out, m, m, m * 1.02);
      }
      return true;
    }
    default: {
      // irregular speck: radius modulated with angle
      const th = Math.atan2(dy, dx);
      const rr = d.r * (1 + 0.35 * Math.sin(3 * th + d.angle * 5) * (d.tone - 0.5) * 2);
      if (rho > rr) return false;
      if (d.kind === 'dust-light') set(out, 0.78, 0.7, 0.58);
      else set(out, 0.16, 0.13, 0.1);
      return true;
    }
  }
}

/** Whether (X, Y) mm lies on the dark line along a panel's edge. */
function onSeam(panels: ShiftedPanel[], X: number, Y: number): boolean {
  for (const p of panels) {
    const g = SEAM_HALF_MM;
    const onX = Y >= p.y && Y <= p.y + p.height && (Math.abs(X - p.x) < g || Math.abs(X - p.x - p.width) < g);
    const onY = X >= p.x && X <= p.x + p.width && (Math.abs(Y - p.y) < g || Math.abs(Y - p.y - p.height) < g);
    if (onX || onY) return true;
  }
  return false;
}

/** The board's surface: a base colour, a slow drift, the fibre (MDF) or grain (plywood), a tone per panel. */
function boardShader(material: SceneOptions['material'], panels: ShiftedPanel[], salt: number): Shader {
  const base = material === 'mdf' ? [0.5, 0.36, 0.24] : [0.62, 0.5, 0.34];
  // each panel a little lighter or darker, from a fixed hash of its index
  const panelTone = panels.map((_, i) => 0.94 + 0.12 * ((Math.sin(i * 12.9898) * 43758.5453) % 1 + 1) / 2);
  return (X, Y, out) => {
    const drift = 0.85 + 0.3 * valueNoise(X / 250, Y / 250, salt);
    let fibre: number;
    if (material === 'mdf') fibre = 0.94 + 0.08 * valueNoise(X / 1.2, Y / 1.2, salt + 1) + 0.04 * valueNoise(X / 6, Y / 0.5, salt + 2);
    else {
      const g = Math.sin((Y + 14 * valueNoise(X / 90, Y / 40, salt + 3)) * 0.9);
      fibre = 0.93 + 0.06 * g * g + 0.05 * valueNoise(X / 8, Y / 0.4, salt + 4);
    }
    let pt = 1;
    for (let i = 0; i < panels.length; i++) {
      const p = panels[i]!;
      if (X >= p.x && X <= p.x + p.width && Y >= p.y && Y <= p.y + p.height) {
        pt = panelTone[i]!;
        break;
      }
    }
    const k = drift * fibre * pt;
    out[0] = base[0]! * k;
    out[1] = base[1]! * k;
    out[2] = base[2]! * k;
  };
}
