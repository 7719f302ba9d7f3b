/**
 * The point spread's anisotropic part from the target's orientation mark: a filled square on white paper, seen
 * whole wherever the target is, however smeared the holes are. Blurring an object adds the point spread's
 * covariance to the covariance of its darkness (moments of a convolution add), and a square of side m has the
 * isotropic covariance (m²/12)·I in its own plane, J (m²/12) Jᵀ in the image through the target's perspective (J:
 * its Jacobian at the mark). What the measured covariance has beyond that is the spread's: (Σxx − Σyy)/2 and Σxy
 * give a straight smear's length and direction (a box of length L along d has covariance (L²/12)·d dᵀ).
 * Darkness is measured in linear light (where the sensor integrated the moving image) against the paper, within a
 * circle about the mark that stays clear of the frame's stroke (a circle's window weighs every direction alike);
 * the paper's own slope across it, read on the circle, is taken out.
 *
 * Frames: image px (origin top-left, +y down); the target frame in mm as in target.ts (`H` maps it to image px).
 */
import { applyH, type Mat3 } from '@/lib/geometry/homography';
import { sampleGrey, toLinear } from './square';
import { FRAME_FRACTION, MARK_CENTRE_FRACTION, MARK_FRACTION } from './target';

/** Anisotropic part of the point spread's covariance, px²: (Σxx − Σyy)/2 and Σxy; null when the mark is not seen. */
export function markSpread(grey: Float32Array, w: number, h: number, H: Mat3, sizeMm: number): [number, number] | null {
  const S = sizeMm;
  const c = MARK_CENTRE_FRACTION * S;
  // the mark is by corner 0 when the square stage saw it; otherwise it may be by any corner: the darkest spot
  const spots = [[c, c], [S - c, c], [S - c, S - c], [c, S - c]] as const;
  const level = ([x, y]: readonly [number, number]) => {
    const p = applyH(H, x, y);
    return sampleGrey(grey, w, h, p[0], p[1]);
  };
  const at = spots.reduce((best, s) => (level(s) < level(best) ? s : best), spots[0]);
  const p0 = applyH(H, at[0], at[1]);
  const e = 0.5;
  const px = applyH(H, at[0] + e, at[1]);
  const py = applyH(H, at[0], at[1] + e);
  const J = [(px[0] - p0[0]) / e, (py[0] - p0[0]) / e, (px[1] - p0[1]) / e, (py[1] - p0[1]) / e];
  const s0 = Math.sqrt(Math.abs(J[0]! * J[3]! - J[1]! * J[2]!)); // px per mm
  // the window: the mark's half diagonal and 60 % of the white gap beyond its sides to the frame's inner edge
  const m = MARK_FRACTION * S;
  const gap = (MARK_CENTRE_FRACTION - MARK_FRACTION / 2 - FRAME_FRACTION) * S;
  const R = (m / Math.SQRT2 + 0.6 * gap) * s0;
  const [cx, cy] = p0;
  if (cx - R - 1 < 0 || cy - R - 1 < 0 || cx + R + 1 > w - 1 || cy + R + 1 > h - 1) return null;
  // the paper's light across the window (a lamp's fall-off) from its first harmonic on the window's rim: the mark
  // smeared along a line stays point-symmetric, so its own tails there have no first harmonic
  const K = 192;
  const hm = [0, 0, 0];
  for (let k = 0; k < K; k++) {
    const th = (2 * Math.PI * k) / K;
    const v = toLinear(sampleGrey(grey, w, h, cx + R * Math.cos(th), cy + R * Math.sin(th)));
    hm[0]! += v / K;
    hm[1]! += (2 * v * Math.cos(th)) / K;
    hm[2]! += (2 * v * Math.sin(th)) / K;
  }
  const paperAt = (dx: number, dy: number) => hm[0]! + (hm[1]! * dx + hm[2]! * dy) / R;
  let m0 = 0, sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0;
  for (let y = Math.ceil(cy - R); y <= Math.floor(cy + R); y++)
    for (let x = Math.ceil(cx - R); x <= Math.floor(cx + R); x++) {
      const dx = x - cx;
      const dy = y - cy;
      if (dx * dx + dy * dy > R * R) continue;
      const D = paperAt(dx, dy) - toLinear(grey[y * w + x]!);
      m0 += D;
      sx += D * dx;
      sy += D * dy;
      sxx += D * dx * dx;
      syy += D * dy * dy;
      sxy += D * dx * dy;
    }
  if (!(m0 > 0)) return null;
  const mx = sx / m0;
  const my = sy / m0;
  const vxx = sxx / m0 - mx * mx;
  const vyy = syy / m0 - my * my;
  const vxy = sxy / m0 - mx * my;
  const k = (m * m) / 12;
  const dxx = k * (J[0]! ** 2 + J[1]! ** 2);
  const dyy = k * (J[2]! ** 2 + J[3]! ** 2);
  const dxy = k * (J[0]! * J[2]! + J[1]! * J[3]!);
  return [(vxx - dxx - (vyy - dyy)) / 2, vxy - dxy];
}
