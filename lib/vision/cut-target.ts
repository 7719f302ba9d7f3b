/**
 * A cut target recognised from its visible part: when the border cuts the printed target's frame, the square
 * search can still find its filled orientation mark whole and take it for a small square. The mark is told from a
 * plain square by the target's printed geometry around it (target.ts): a filled square of side m = MARK_FRACTION·S
 * whose two sides towards corner 0 face, at 1.2 to 2.2 m beyond them, the frame's stroke, a dark band parallel to
 * the side with paper on both sides of it (the white gap inside the frame, the paper margin outside).
 *
 * Frames: image px (origin top-left, +y down); the mark's unit frame: the found square's corners at (0, 0), (1, 0),
 * (1, 1), (0, 1), one unit = the mark's side; the target frame in fractions of S as in target.ts.
 */
import { applyH, homographyFrom4, type Mat3 } from '@/lib/geometry/homography';
import { sampleGrey, type Corners } from './square';
import { FRAME_FRACTION, MARK_CENTRE_FRACTION, MARK_FRACTION, PAPER_MARGIN_FRACTION } from './target';

/** Where the printed target puts things beyond a side of its mark, in mark sides from that side. */
const GAP_FROM = 0; // the white gap between the mark and the frame's inner edge starts at the mark
const STROKE_FROM = (MARK_CENTRE_FRACTION - MARK_FRACTION / 2 - FRAME_FRACTION) / MARK_FRACTION; // 1.2
const STROKE_TO = (MARK_CENTRE_FRACTION - MARK_FRACTION / 2) / MARK_FRACTION; // 2.2
const MARGIN_TO = STROKE_TO + PAPER_MARGIN_FRACTION / MARK_FRACTION; // 3.4

/** The four sides of the unit frame: start, end and outward normal. */
const SIDES = [
  { a: [0, 0], b: [1, 0], n: [0, -1] },
  { a: [1, 0], b: [1, 1], n: [1, 0] },
  { a: [1, 1], b: [0, 1], n: [0, 1] },
  { a: [0, 1], b: [0, 0], n: [-1, 0] },
] as const;

export interface CutTargetMark {
  /** The whole target's outer corners in image px as the mark implies them, in order around it. */
  targetCornersPx: Corners;
  /** Whether that whole target runs off the photo. */
  offPhoto: boolean;
}

type Look = 'stroke' | 'other' | 'unseen';

/**
 * What lies beyond one side of the square: 'stroke' when, along the side and past its ends (where a frame stroke
 * would run), paper, a dark band and paper follow at the target's distances; 'unseen' when that part is off the
 * photo.
 */
function lookBeyond(U: Mat3, grey: Float32Array, w: number, h: number, side: (typeof SIDES)[number], mid: number): Look {
  const at = (along: number, out: number): number | null => {
    const x = side.a[0] + (side.b[0] - side.a[0]) * along + side.n[0] * out;
    const y = side.a[1] + (side.b[1] - side.a[1]) * along + side.n[1] * out;
    const p = applyH(U, x, y);
    return p[0] < 0 || p[1] < 0 || p[0] > w - 1 || p[1] > h - 1 ? null : sampleGrey(grey, w, h, p[0], p[1]);
  };
  let seen = 0;
  let match = 0;
  // along the side and a side's length past each end: the stroke runs the whole target side
  for (let k = 0; k <= 12; k++) {
    const along = -1 + (3 * k) / 12;
    const gap = at(along, (GAP_FROM + STROKE_FROM) / 2);
    const ink = at(along, (STROKE_FROM + STROKE_TO) / 2);
    const margin = at(along, (STROKE_TO + MARGIN_TO) / 2);
    if (gap === null || ink === null || margin === null) continue;
    seen++;
    if (gap > mid && ink < mid && margin > mid) match++;
  }
  if (seen < 4) return 'unseen';
  return match >= 0.75 * seen ? 'stroke' : 'other';
}

/**
 * Whether a found square (image px, any order around it) is the filled orientation mark of a target whose frame
 * is not whole in the photo; null when it is not (a plain square, a framed target, anything else).
 */
export function cutTargetMark(grey: Float32Array, w: number, h: number, corners: Corners): CutTargetMark | null {
  const U = homographyFrom4([[0, 0], [1, 0], [1, 1], [0, 1]], corners);
  const mean = (pts: [number, number][]) => {
    let s = 0;
    let n = 0;
    for (const [u, v] of pts) {
      const p = applyH(U, u, v);
      if (p[0] < 0 || p[1] < 0 || p[0] > w - 1 || p[1] > h - 1) continue;
      s += sampleGrey(grey, w, h, p[0], p[1]);
      n++;
    }
    return n ? s / n : NaN;
  };
  const grid = (c: number, half: number) => Array.from({ length: 25 }, (_, k) => [c + half * ((k % 5) / 2 - 1), c + half * (Math.floor(k / 5) / 2 - 1)] as [number, number]);
  const ink = mean(grid(0.5, 0.3));
  // paper: the white gap all around the mark, half way to where the stroke would be
  const r = (GAP_FROM + STROKE_FROM) / 2;
  const paper = mean(SIDES.flatMap((s) => [0.2, 0.5, 0.8].map((f) => [s.a[0] + (s.b[0] - s.a[0]) * f + s.n[0] * r, s.a[1] + (s.b[1] - s.a[1]) * f + s.n[1] * r] as [number, number])));
  // a filled square on paper (a framed target's square is light inside)
  if (!(paper - ink > 25)) return null;
  const mid = (ink + paper) / 2;
  const looks = SIDES.map((s) => lookBeyond(U, grey, w, h, s, mid));
  // corner k of the unit frame lies between side k − 1 and side k: both face a stroke (or one is off the photo)
  for (let k = 0; k < 4; k++) {
    const s0 = looks[(k + 3) % 4]!;
    const s1 = looks[k]!;
    const strokes = (s0 === 'stroke' ? 1 : 0) + (s1 === 'stroke' ? 1 : 0);
    if (strokes === 0 || (strokes === 1 && s0 !== 'unseen' && s1 !== 'unseen')) continue;
    // the whole target from the mark: corner k of the mark is nearest target corner 0, at STROKE_TO beyond both sides
    const o = [[0, 0], [1, 0], [1, 1], [0, 1]][k]!;
    const far = [[1, 1], [0, 1], [0, 0], [1, 0]][k]!;
    const dir = [Math.sign(o[0]! - far[0]!), Math.sign(o[1]! - far[1]!)];
    const span = 1 / MARK_FRACTION; // the target's side in mark sides
    const c0 = [o[0]! + dir[0]! * STROKE_TO, o[1]! + dir[1]! * STROKE_TO];
    const unit = [[0, 0], [1, 0], [1, 1], [0, 1]] as const;
    const pts = unit.map(([a, b]) => applyH(U, c0[0]! - dir[0]! * span * a, c0[1]! - dir[1]! * span * b));
    const targetCornersPx = pts.map((p) => [p[0], p[1]]) as Corners;
    const offPhoto = targetCornersPx.some(([x, y]) => x < 0 || y < 0 || x > w - 1 || y > h - 1);
    return { targetCornersPx, offPhoto };
  }
  return null;
}
