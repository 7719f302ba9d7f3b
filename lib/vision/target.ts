/**
 * Gridproof's printable reference target: its geometry, shared by the detector, the renderer and the PDF that
 * prints it.
 *
 * Target frame: millimetres, origin at the outer corner nearest the orientation mark (corner 0), +x along the
 * printed bottom edge, +y up the page. Corners in order 0..3 are (0,0), (S,0), (S,S), (0,S), counter-clockwise
 * seen from above, where S is the stated outer size.
 *
 * Layout as fractions of S:
 * - a black square frame, outer edge S × S, stroke `FRAME_FRACTION` × S wide (the inner edge is a white square);
 * - a filled black orientation mark, a square of side `MARK_FRACTION` × S, centred at
 *   (`MARK_CENTRE_FRACTION` × S, `MARK_CENTRE_FRACTION` × S), i.e. inside the white interior next to corner 0;
 * - white paper of at least `paperMarginMm(S)` beyond the frame on every side (`PAPER_MARGIN_FRACTION` × S, at most
 *   `PAPER_MARGIN_MAX_MM`; the detector looks for a lighter surround a few per cent of S wide); the printed check
 *   ruler lies outside that margin.
 */

/** Width of the black frame stroke as a fraction of the outer size. */
export const FRAME_FRACTION = 0.1;
/** Side of the filled orientation mark as a fraction of the outer size. */
export const MARK_FRACTION = 0.1;
/** Centre of the orientation mark along both axes of the target frame, as a fraction of the outer size. */
export const MARK_CENTRE_FRACTION = 0.27;
/** Minimum white margin around the frame, as a fraction of the outer size. */
export const PAPER_MARGIN_FRACTION = 0.12;
/** Largest white margin a target needs, mm (a 250 mm square keeps 14.7 mm to the edges of Tabloid paper). */
export const PAPER_MARGIN_MAX_MM = 14;
/** White margin kept clear around the frame of a target of outer size `sizeMm`, mm. */
export function paperMarginMm(sizeMm: number): number {
  return Math.min(PAPER_MARGIN_FRACTION * sizeMm, PAPER_MARGIN_MAX_MM);
}

/** The four outer corners in the target frame, mm, in order 0..3 (counter-clockwise from the mark corner). */
export function targetCornersMm(sizeMm: number): [number, number][] {
  return [
    [0, 0],
    [sizeMm, 0],
    [sizeMm, sizeMm],
    [0, sizeMm],
  ];
}

/** Is the target-frame point (mm) printed black? Frame stroke or orientation mark. */
export function targetInkAt(xMm: number, yMm: number, sizeMm: number): boolean {
  const s = sizeMm;
  if (xMm < 0 || yMm < 0 || xMm > s || yMm > s) return false;
  const w = FRAME_FRACTION * s;
  if (xMm < w || yMm < w || xMm > s - w || yMm > s - w) return true;
  const c = MARK_CENTRE_FRACTION * s;
  const h = (MARK_FRACTION * s) / 2;
  return Math.abs(xMm - c) <= h && Math.abs(yMm - c) <= h;
}
