/**
 * A target cut by the border recognised from its visible part (lib/vision/cut-target.ts): the square search finds
 * the whole orientation mark of a target cut through its middle; the printed geometry around it (target.ts) tells
 * it from a plain square, and the whole target it implies is checked against the renderer's true target corners.
 */
import { describe, expect, it } from 'vitest';
import { cutTargetMark } from '@/lib/vision/cut-target';
import { loadPhoto, reduce } from '@/lib/vision/load';
import { synthesize } from '@/lib/vision/render';
import { degrade } from '@/lib/vision/render/degrade';
import { findSquare } from '@/lib/vision/square';
import { cutThroughTarget, SMALL_BED } from './scenes';

async function squareIn(jpeg: Buffer) {
  const img = await loadPhoto(jpeg);
  const small = reduce(img.grey, img.width, img.height, 1);
  const sq = await findSquare(img.grey, img.width, img.height, small, 1);
  return { img, sq };
}

describe('cut target', () => {
  it('recognises the whole mark of a target cut through its middle and puts the whole target where it truly is', async () => {
    const { jpeg, truth } = await synthesize(SMALL_BED, { width: 1200, height: 900, supersample: 3, seed: 752, tiltDeg: 6 });
    const { crop } = cutThroughTarget(truth);
    const { img, sq } = await squareIn((await degrade(jpeg, { crop })).jpeg);
    // what the square search finds in the cut photo is the mark: a tenth of the target's side (target.ts)
    const side = Math.hypot(truth.target.cornersPx[1]![0] - truth.target.cornersPx[0]![0], truth.target.cornersPx[1]![1] - truth.target.cornersPx[0]![1]);
    expect(sq).not.toBeNull();
    const found = Math.hypot(sq!.corners[1][0] - sq!.corners[0][0], sq!.corners[1][1] - sq!.corners[0][1]);
    expect(Math.abs(found / side - 0.1)).toBeLessThan(0.02);
    const mark = cutTargetMark(img.grey, img.width, img.height, sq!.corners);
    expect(mark?.offPhoto).toBe(true);
    // each true corner (renderer's truth, moved by the crop) has an implied corner within 3 % of the side
    for (const [tx, ty] of truth.target.cornersPx) {
      const d = Math.min(...mark!.targetCornersPx.map(([x, y]) => Math.hypot(x - (tx - crop.x), y - (ty - crop.y))));
      expect(d).toBeLessThan(0.03 * side);
    }
  }, 30_000);

  it('does not take a plain filled square or a whole framed target for a mark', async () => {
    for (const targetStyle of ['plain', 'frame'] as const) {
      const { jpeg } = await synthesize(SMALL_BED, { width: 1200, height: 900, supersample: 3, seed: 361, targetStyle });
      const { img, sq } = await squareIn(jpeg);
      expect(cutTargetMark(img.grey, img.width, img.height, sq!.corners)).toBeNull();
    }
  }, 30_000);
});
