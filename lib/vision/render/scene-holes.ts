/**
 * The holes of a rendered scene: each nominal position moved by the injected errors, projected into the photo, and
 * marked hidden where the photo's border, the sheet, an object or a channel reaches its outer disc.
 * Bed frame: mm, origin front-left, +X right, +Y away; image: px, origin top-left, +y down.
 */
import type { Pattern } from '@/lib/geometry/contract';
import { projectBed, type Camera } from './camera';
import type { BedCover } from './scene-cover';
import type { DiscGrid } from './scene-discs';
import { trueBedPosition, type LatticeErrors } from './scene-errors';
import type { Scene, SceneOptions, TruthHole } from './scene';

/** A threaded insert's flange paints this many times its bore radius. */
const INSERT_FLANGE_RATIO = 1.75;

/**
 * Places every position of the pattern (families in order, rows then columns), records its truth and the misplaced
 * ones, and adds its disc to `discs` (drawing its look from the random stream, angle then tone).
 */
export function placeHoles(
  rng: () => number,
  pattern: Pattern,
  errors: LatticeErrors,
  camera: Camera,
  mmPerPx: number,
  photo: Pick<SceneOptions, 'width' | 'height'>,
  cover: BedCover,
  discs: DiscGrid,
): { holes: TruthHole[]; misplaced: Scene['errors']['misplaced'] } {
  const bedCentre = [pattern.bed.width / 2, pattern.bed.height / 2] as const;
  const holes: TruthHole[] = [];
  const misplaced: Scene['errors']['misplaced'] = [];
  let index = 0;
  for (const f of pattern.families) {
    const insert = f.kind === 'threaded-insert';
    for (let row = 0; row < f.count.y; row++)
      for (let col = 0; col < f.count.x; col++, index++) {
        const nx = f.origin.x + col * f.pitch.x;
        const ny = f.origin.y + row * f.pitch.y;
        const bed = trueBedPosition(errors, bedCentre, nx, ny, index);
        if (bed.misplacement) misplaced.push({ family: f.id, col, row, dx: bed.misplacement[0], dy: bed.misplacement[1] });
        const r = f.holeDiameter / 2;
        const outer = insert ? r * INSERT_FLANGE_RATIO : r;
        const px = projectBed(camera, bed.x, bed.y) ?? [-1, -1];
        const hiddenBy = hiddenByOf(bed.x, bed.y, outer, px, mmPerPx, photo, cover);
        holes.push({ family: f.id, kind: f.kind, col, row, nominal: { x: nx, y: ny }, bed: { x: bed.x, y: bed.y }, px, diameterMm: f.holeDiameter, visible: !hiddenBy, ...(hiddenBy ? { hiddenBy } : {}) });
        discs.add({ x: bed.x, y: bed.y, r, kind: insert ? 'insert' : 'dog', outer, angle: rng() * Math.PI, tone: rng() });
      }
  }
  return { holes, misplaced };
}

/**
 * Why a hole at bed (X, Y) mm with outer radius `outerMm`, seen at `px`, is hidden, if it is: its outer disc (1.5×)
 * within 2 px of the photo's border; else its centre or any of eight points 5 % beyond its outer rim under the
 * sheet, under an object, or in a channel (checked in that order at each point).
 */
function hiddenByOf(X: number, Y: number, outerMm: number, px: [number, number], mmPerPx: number, photo: Pick<SceneOptions, 'width' | 'height'>, cover: BedCover): TruthHole['hiddenBy'] {
  const edgePx = (outerMm * 1.5) / mmPerPx + 2;
  if (px[0] < edgePx || px[1] < edgePx || px[0] > photo.width - edgePx || px[1] > photo.height - edgePx) return 'outside';
  for (let k = 0; k < 8; k++) {
    const a = (k * Math.PI) / 4;
    const qx = X + outerMm * 1.05 * Math.cos(a);
    const qy = Y + outerMm * 1.05 * Math.sin(a);
    if (cover.sheetAt(qx, qy) || cover.sheetAt(X, Y)) return 'target';
    if (cover.occluderAt(qx, qy) !== undefined || cover.occluderAt(X, Y) !== undefined) return 'occluder';
    if (cover.channelAt(qx, qy) >= 0) return 'channel';
  }
  return undefined;
}
