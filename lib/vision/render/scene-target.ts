/**
 * Where a rendered scene's printed square lies and which bed points its sheet covers.
 * Bed frame: mm, origin front-left, +X right, +Y away. Square frame: mm, origin at the square's corner 0, axes along
 * its sides (the frame targetInkAt reads, lib/vision/target.ts). Image: px, origin top-left, +y down.
 */
import { PAPER_MARGIN_FRACTION } from '../target';
import { projectBed, type Camera } from './camera';
import { undistortedPixelToBed } from './scene-camera';
import { uniform, type Rng } from './rng';
import type { SceneOptions } from './scene';

/** ISO 216 A4, mm: the default sheet. */
const A4_MM = [210, 297] as const;
/** Bed kept clear around a randomly placed sheet, mm. */
const PLACEMENT_CLEARANCE_MM = 20;
/** Largest random turn of the square, radians. */
const RANDOM_TURN_MAX_RAD = 0.6;

export interface SceneTarget {
  /** Outer size of the square, mm. */
  sizeMm: number;
  /** The square's centre on the bed, mm, and its turn, radians (counter-clockwise seen from above). */
  centreMm: [number, number];
  rotationRad: number;
  /** Corners 0..3 in the square's order, bed mm and image px. */
  cornersBed: [number, number][];
  cornersPx: [number, number][];
  /** Half the sheet's width and height, mm (the sheet is centred on the square and turned with it). */
  sheetHalfMm: [number, number];
}

/**
 * Places the square: its turn drawn from the random stream (or given), its centre drawn inside the bed or next to an
 * edge of the photo (or given); the sheet as given, else A4 or the square and its margin if larger.
 */
export function placeTarget(rng: Rng, bed: { width: number; height: number }, camera: Camera, mmPerPx: number, opts: Pick<SceneOptions, 'width' | 'height' | 'targetMm' | 'targetPlacement' | 'targetCentreMm' | 'targetRotationDeg' | 'sheetMm'>): SceneTarget {
  const S = opts.targetMm;
  const randomTurnRad = uniform(rng, -RANDOM_TURN_MAX_RAD, RANDOM_TURN_MAX_RAD);
  const rotationRad = opts.targetRotationDeg !== undefined ? (opts.targetRotationDeg * Math.PI) / 180 : randomTurnRad;
  let centre = opts.targetPlacement === 'edge' ? centreNextToPhotoEdge(rng, camera, mmPerPx, S, opts) : randomCentreInBed(rng, bed, S);
  if (opts.targetCentreMm) centre = opts.targetCentreMm;
  const [tcx, tcy] = centre;
  const cr = Math.cos(rotationRad);
  const sr = Math.sin(rotationRad);
  const squareToBed = (x: number, y: number): [number, number] => {
    const lx = x - S / 2;
    const ly = y - S / 2;
    return [tcx + cr * lx - sr * ly, tcy + sr * lx + cr * ly];
  };
  const cornersBed = ([[0, 0], [S, 0], [S, S], [0, S]] as const).map(([x, y]) => squareToBed(x, y));
  const cornersPx = cornersBed.map(([X, Y]) => projectBed(camera, X, Y)!);
  const sheetHalfMm: [number, number] = [
    opts.sheetMm ? opts.sheetMm[0] / 2 : S / 2 + Math.max(PAPER_MARGIN_FRACTION * S, (A4_MM[0] - S) / 2),
    opts.sheetMm ? opts.sheetMm[1] / 2 : S / 2 + Math.max(PAPER_MARGIN_FRACTION * S, (A4_MM[1] - S) / 2),
  ];
  return { sizeMm: S, centreMm: [tcx, tcy], rotationRad, cornersBed, cornersPx, sheetHalfMm };
}

/** A centre (bed mm) drawn uniformly where the square, its margin and a clearance stay on the bed. */
function randomCentreInBed(rng: Rng, bed: { width: number; height: number }, S: number): [number, number] {
  const half = S / 2 + PAPER_MARGIN_FRACTION * S + PLACEMENT_CLEARANCE_MM;
  const x = uniform(rng, half, Math.max(half, bed.width - half));
  const y = uniform(rng, half, Math.max(half, bed.height - half));
  return [x, y];
}

/** A centre (bed mm) under a spot near a drawn edge of the photo (0 left, 1 right, 2 top, 3 bottom), along it at random. */
function centreNextToPhotoEdge(rng: Rng, camera: Camera, mmPerPx: number, S: number, opts: Pick<SceneOptions, 'width' | 'height'>): [number, number] {
  const side = Math.floor(rng() * 4);
  const marginPx = (S * 0.75) / mmPerPx + 0.02 * Math.min(opts.width, opts.height);
  const u = side === 0 ? marginPx : side === 1 ? opts.width - marginPx : uniform(rng, 0.3, 0.7) * opts.width;
  const v = side === 2 ? marginPx : side === 3 ? opts.height - marginPx : uniform(rng, 0.3, 0.7) * opts.height;
  return undistortedPixelToBed(camera, u, v);
}

/**
 * The lookup of the sheet: bed point (mm) → the point in the square frame (mm; outside 0..S on the margin), or null
 * off the sheet.
 */
export function sheetLookup(target: SceneTarget): (X: number, Y: number) => [number, number] | null {
  const S = target.sizeMm;
  const [tcx, tcy] = target.centreMm;
  const [paperHalfW, paperHalfH] = target.sheetHalfMm;
  const cr = Math.cos(target.rotationRad);
  const sr = Math.sin(target.rotationRad);
  return (X, Y) => {
    const dx = X - tcx;
    const dy = Y - tcy;
    const lx = cr * dx + sr * dy;
    const ly = -sr * dx + cr * dy;
    if (Math.abs(lx) > paperHalfW || Math.abs(ly) > paperHalfH) return null;
    return [lx + S / 2, ly + S / 2];
  };
}
