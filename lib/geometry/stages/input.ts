/**
 * Stage 1 — input. Validates the points (image px, origin top-left, +y down) and the pattern (mm or in), builds the
 * nominal lattice (bed mm, origin front-left, +X right, +Y away from the operator), orders the reference square's
 * corners (px) with its homography (square frame mm → image px), and sets aside the detections that lie on the
 * reference sheet (they are not holes of the bed).
 */
import { PatternSchema, PointsSchema, RIM_MARGIN_PX, type HiddenReason, type Pattern, type Points } from '../contract';
import { defaultFocalPx } from '../camera';
import type { Detections } from '../correspond';
import { GeometryInputError } from '../errors';
import type { Pt } from '../homography';
import { buildLattice, type Lattice } from '../lattice';
import { mat3Inv, type Mat3 } from '../linalg';
import { insideQuad, orderSquareCorners, squareHomography } from '../square';
import { patternToMm, type PatternMm } from '../units';

/** Everything later stages read from the input; nothing here changes after this stage. */
export interface AnalysisInput {
  /** The validated points as given (image px). */
  points: Points;
  /** The pattern in mm. */
  pattern: PatternMm;
  lattice: Lattice;
  /** Image size, px; the focal length the fit starts from (EXIF, else assumed), px. */
  image: { width: number; height: number; startFocalPx: number };
  square: {
    /** Corners in order around the square (image px). */
    corners: [Pt, Pt, Pt, Pt];
    /** Square frame (mm, origin at the first corner) → image px, and its inverse. */
    toImage: Mat3;
    fromImage: Mat3;
    /** Side, px: the square root of the area of the corners' quadrilateral. */
    sidePx: number;
  };
  detections: Detections;
  /** 1 for a detection that may be a hole of the bed, 0 for one on the reference sheet or seen only in part. */
  usable: Uint8Array;
  /**
   * Whether a hole centred at (u, v) px with rim radius rPx is seen only in part: its rim, with RIM_MARGIN_PX, meets
   * the reference sheet's outline (`points.sheet`) or the photo's border.
   */
  rimMeets: (u: number, v: number, rPx: number) => HiddenReason | null;
}

/** Parses `x` with a zod schema, throwing GeometryInputError naming the first bad field under `root`. */
export function parseOrThrow<T>(schema: { safeParse(x: unknown): { success: true; data: T } | { success: false; error: { issues: { path: PropertyKey[]; message: string }[] } } }, x: unknown, root: string): T {
  const r = schema.safeParse(x);
  if (r.success) return r.data;
  const issue = r.error.issues[0]!;
  const field = [root, ...issue.path.map(String)].join('.');
  throw new GeometryInputError(field, issue.message);
}

/** Within this fraction of the square's side (px) around its quadrilateral a detection counts as on the sheet. */
export const ON_SHEET_PAD = 0.02;

/**
 * Validates and prepares the input.
 * @param points detections and reference square, image px
 * @param pattern the bed's nominal pattern (mm or in)
 */
export function prepareInput(points: Points, pattern: Pattern): AnalysisInput {
  const pts = parseOrThrow<Points>(PointsSchema, points, 'points');
  const pat = parseOrThrow<Pattern>(PatternSchema, pattern, 'pattern');
  const pm = patternToMm(pat);
  let lattice: Lattice;
  try { lattice = buildLattice(pm); } catch (e) { throw new GeometryInputError('pattern.families', (e as Error).message); }
  const { width, height } = pts.image;
  const corners = orderSquareCorners(pts.reference.corners as unknown as Pt[]);
  const toImage = squareHomography(corners, pts.reference.sizeMm);
  const n = pts.holes.length;
  const detections: Detections = {
    n, u: Float64Array.from(pts.holes, (h) => h.x), v: Float64Array.from(pts.holes, (h) => h.y),
    dPx: Float64Array.from(pts.holes, (h) => h.diameterPx), conf: Float64Array.from(pts.holes, (h) => h.confidence ?? 1),
  };
  const sidePx = Math.sqrt(Math.abs((corners[2][0] - corners[0][0]) * (corners[3][1] - corners[1][1]) - (corners[3][0] - corners[1][0]) * (corners[2][1] - corners[0][1])) / 2);
  const usable = new Uint8Array(n);
  for (let i = 0; i < n; i++) usable[i] = insideQuad(corners, detections.u[i]!, detections.v[i]!, ON_SHEET_PAD * sidePx) ? 0 : 1;
  // A hole whose rim meets the sheet or the border is seen only in part: its centre would be biased, so it is not
  // measured (its position is reported hidden, stage 8).
  const sheet = pts.sheet ? orderSquareCorners(pts.sheet as unknown as Pt[]) : null;
  const rimMeets = (u: number, v: number, rPx: number): HiddenReason | null => {
    const reach = rPx + RIM_MARGIN_PX;
    if (sheet && insideQuad(sheet, u, v, reach)) return 'sheet';
    if (u < reach || v < reach || u > width - reach || v > height - reach) return 'border';
    return null;
  };
  for (let i = 0; i < n; i++) if (usable[i] && rimMeets(detections.u[i]!, detections.v[i]!, detections.dPx[i]! / 2)) usable[i] = 0;
  return {
    points: pts, pattern: pm, lattice,
    image: { width, height, startFocalPx: pts.image.focalPx ?? defaultFocalPx(width, height) },
    square: { corners, toImage, fromImage: mat3Inv(toImage), sidePx },
    detections, usable, rimMeets,
  };
}
