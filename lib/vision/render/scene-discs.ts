/**
 * The round features painted on a rendered bed (hole rims and bores, screw heads, dust), kept in a coarse grid of
 * bed cells for the per-pixel lookup, and the screws and dust scattered off the holes.
 * Bed frame: mm, origin front-left, +X right, +Y away.
 */
import { uniform, type Rng } from './rng';
import type { SceneOptions } from './scene';

export interface Disc {
  /** Centre, bed mm. */
  x: number;
  y: number;
  /** Radius of the bore, head or speck, mm. */
  r: number;
  kind: 'insert' | 'dog' | 'screw' | 'dust-dark' | 'dust-light';
  /** Outer radius that the feature paints (flange, head), mm. */
  outer: number;
  /** A turn of the feature's look (screw slot, speck outline), radians. */
  angle: number;
  /** A draw in 0..1 that varies the look (brass or steel, speck outline). */
  tone: number;
}

/** Side of a grid cell, mm. */
const CELL_MM = 30;
const cellKey = (ix: number, iy: number) => ix * 100003 + iy;

/** Discs by the bed cells (CELL_MM square) their outer radius reaches. */
export class DiscGrid {
  private readonly cells = new Map<number, Disc[]>();

  add(d: Disc): void {
    const x0 = Math.floor((d.x - d.outer) / CELL_MM);
    const x1 = Math.floor((d.x + d.outer) / CELL_MM);
    const y0 = Math.floor((d.y - d.outer) / CELL_MM);
    const y1 = Math.floor((d.y + d.outer) / CELL_MM);
    for (let ix = x0; ix <= x1; ix++)
      for (let iy = y0; iy <= y1; iy++) {
        const k = cellKey(ix, iy);
        const l = this.cells.get(k);
        if (l) l.push(d);
        else this.cells.set(k, [d]);
      }
  }

  /** The discs that may cover bed point (X, Y) mm, in the order added; undefined where none reach its cell. */
  at(X: number, Y: number): Disc[] | undefined {
    return this.cells.get(cellKey(Math.floor(X / CELL_MM), Math.floor(Y / CELL_MM)));
  }

  /** Whether bed point (X, Y) mm lies within `clearMm` of a disc's outer radius (of those in its cell). */
  near(X: number, Y: number, clearMm: number): boolean {
    const l = this.at(X, Y);
    if (!l) return false;
    return l.some((d) => Math.hypot(d.x - X, d.y - Y) < d.outer + clearMm);
  }
}

/** Countersunk screw head: radius and painted radius, mm; kept this far from the holes, mm; and off the bed's sides. */
const SCREW_R_MM = 4.5;
const SCREW_OUTER_MM = 4.6;
const SCREW_CLEAR_MM = 8;
const SCREW_SIDE_MARGIN_MM = 10;
/** A speck keeps its radius plus this from the holes, mm. */
const DUST_CLEAR_MM = 1.5;

/**
 * Scatters screws and then dust over the bed (densities per m², SceneOptions) from the random stream, leaving out
 * any that would touch a disc already there, so that the truth of a hole is its own edge.
 */
export function scatterScrewsAndDust(rng: Rng, bed: { width: number; height: number }, opts: Pick<SceneOptions, 'screwsPerM2' | 'dustPerM2'>, discs: DiscGrid): void {
  const bw = bed.width;
  const bh = bed.height;
  const areaM2 = (bw * bh) / 1e6;
  const screwCount = Math.round(opts.screwsPerM2 * areaM2);
  for (let i = 0; i < screwCount; i++) {
    const X = uniform(rng, SCREW_SIDE_MARGIN_MM, bw - SCREW_SIDE_MARGIN_MM);
    const Y = uniform(rng, SCREW_SIDE_MARGIN_MM, bh - SCREW_SIDE_MARGIN_MM);
    if (discs.near(X, Y, SCREW_CLEAR_MM)) continue;
    discs.add({ x: X, y: Y, r: SCREW_R_MM, outer: SCREW_OUTER_MM, kind: 'screw', angle: rng() * Math.PI, tone: rng() });
  }
  const dustCount = Math.round(opts.dustPerM2 * areaM2);
  for (let i = 0; i < dustCount; i++) {
    const X = uniform(rng, 0, bw);
    const Y = uniform(rng, 0, bh);
    const r = 0.1 + 0.9 * rng() ** 3; // mostly fine dust, a few 1 mm chips
    if (discs.near(X, Y, r + DUST_CLEAR_MM)) continue;
    discs.add({ x: X, y: Y, r, outer: r * 1.4, kind: rng() < 0.6 ? 'dust-light' : 'dust-dark', angle: rng() * Math.PI, tone: rng() });
  }
}
