/**
 * The errors a rendered scene injects into the lattice, and where they move a nominal hole.
 * Bed frame: mm, origin front-left, +X right, +Y away. Angles in the scene truth are degrees.
 *
 * Applied in this order to each nominal position p (bed centre c):
 *   lattice:  X = c.x + (1 + scaleX)(p.x − c.x) − (1 + scaleY)·sin(squarenessRad)(p.y − c.y),
 *             Y = c.y + (1 + scaleY)·cos(squarenessRad)(p.y − c.y)
 *             — the report's own terms (lib/geometry/affine.ts composeAffine with no rotation): squareness is the
 *             angle between the lattice's X and Y axes minus 90°, so a report of this scene measures +squarenessDeg.
 *   panel:    rotation by the panel's rotationDeg about the panel centre, then + (panel.dx, panel.dy)
 *   misplace: + (dx, dy) for the few misplaced positions.
 */
import type { Panel, Pattern } from '@/lib/geometry/contract';
import { uniform, type Rng } from './rng';
import type { SceneOptions } from './scene';

/** A panel of the pattern with its injected shift (mm) and turn (degrees, about its centre). */
export interface ShiftedPanel extends Panel {
  dx: number;
  dy: number;
  rotationDeg: number;
}

export interface LatticeErrors {
  /** Scale errors along bed X and Y, dimensionless (400 ppm = 4e-4). */
  scaleX: number;
  scaleY: number;
  /** Angle between the lattice's X and Y axes minus 90°, degrees. */
  squarenessDeg: number;
  /** The lattice's Y axis in bed mm per nominal mm: (−(1 + scaleY) sin, (1 + scaleY) cos) of the squareness. */
  yAxis: readonly [number, number];
  panels: ShiftedPanel[];
  /** Offset (dx, dy) in mm by position index (families in order, rows then columns), for the misplaced few. */
  misplacedByIndex: Map<number, [number, number]>;
}

/** Largest injected panel turn, degrees (a board screwed down a little askew). */
const PANEL_TURN_MAX_DEG = 0.02;

/** Draws the lattice, panel and misplacement errors from the scene's random stream (scale, squareness, panels, misplaced). */
export function drawLatticeErrors(rng: Rng, pattern: Pattern, opts: Pick<SceneOptions, 'scalePpm' | 'squarenessDeg' | 'panelOffsetMm' | 'misplacedCount' | 'misplacedMm'>): LatticeErrors {
  const scaleX = (uniform(rng, -1, 1) * opts.scalePpm) / 1e6;
  const scaleY = (uniform(rng, -1, 1) * opts.scalePpm) / 1e6;
  const squarenessDeg = uniform(rng, -1, 1) * opts.squarenessDeg;
  const squarenessRad = (squarenessDeg * Math.PI) / 180;
  const yAxis = [-(1 + scaleY) * Math.sin(squarenessRad), (1 + scaleY) * Math.cos(squarenessRad)] as const;
  const panels = (pattern.panels ?? []).map((p) => ({
    ...p,
    dx: uniform(rng, -1, 1) * opts.panelOffsetMm,
    dy: uniform(rng, -1, 1) * opts.panelOffsetMm,
    rotationDeg: uniform(rng, -1, 1) * PANEL_TURN_MAX_DEG,
  }));
  const positionCount = pattern.families.reduce((n, f) => n + f.count.x * f.count.y, 0);
  const misplacedByIndex = new Map<number, [number, number]>();
  for (let i = 0; i < Math.min(opts.misplacedCount, positionCount); i++) {
    const index = Math.floor(rng() * positionCount);
    const directionRad = rng() * 2 * Math.PI;
    const offsetMm = opts.misplacedMm * (0.5 + 0.5 * rng());
    misplacedByIndex.set(index, [offsetMm * Math.cos(directionRad), offsetMm * Math.sin(directionRad)]);
  }
  return { scaleX, scaleY, squarenessDeg, yAxis, panels, misplacedByIndex };
}

/**
 * True bed position (mm) of the nominal position (nx, ny) mm with index `index`: lattice, then its panel, then its
 * misplacement (returned too, when it has one). `bedCentre` is the lattice errors' fixed point, mm.
 */
export function trueBedPosition(errors: LatticeErrors, bedCentre: readonly [number, number], nx: number, ny: number, index: number): { x: number; y: number; misplacement?: [number, number] } {
  const [cx0, cy0] = bedCentre;
  let X = cx0 + (1 + errors.scaleX) * (nx - cx0) + errors.yAxis[0] * (ny - cy0);
  let Y = cy0 + errors.yAxis[1] * (ny - cy0);
  const pn = errors.panels.find((p) => nx >= p.x && nx <= p.x + p.width && ny >= p.y && ny <= p.y + p.height);
  if (pn) {
    const a = (pn.rotationDeg * Math.PI) / 180;
    const pcx = pn.x + pn.width / 2;
    const pcy = pn.y + pn.height / 2;
    const dx = X - pcx;
    const dy = Y - pcy;
    X = pcx + Math.cos(a) * dx - Math.sin(a) * dy + pn.dx;
    Y = pcy + Math.sin(a) * dx + Math.cos(a) * dy + pn.dy;
  }
  const misplacement = errors.misplacedByIndex.get(index);
  if (!misplacement) return { x: X, y: Y };
  return { x: X + misplacement[0], y: Y + misplacement[1], misplacement };
}
