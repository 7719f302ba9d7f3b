import { describe, expect, it } from 'vitest';
import { loadCv } from './opencv';
import { discImageCentroidPx, distortPx, focalFromHomography, lookAt, projectBedPoint, undistortPx, type Lens } from '@/lib/geometry/camera';
import { homographyDlt, type Pt } from '@/lib/geometry/homography';
import { applyH, mat3Inv, type Mat3 } from '@/lib/geometry/linalg';

describe('Brown–Conrady lens model', () => {
  it("maps ideal pixels to distorted ones as OpenCV's undistort does", () => {
    // Independent library: OpenCV 4.3 (opencv-wasm) cv.undistort. Undistorting an image whose pixel value is its own
    // x (or y) coordinate yields, at each ideal pixel, the distorted source coordinate OpenCV samples — its
    // Brown–Conrady forward map (bilinear interpolation of a linear ramp is exact up to OpenCV's 1/32 px tables).
    const cv = loadCv();
    const W = 320, H = 240;
    const lens: Lens = { fPx: 300, cx: 160, cy: 120, k1: -0.2, k2: 0.05 };
    const K = cv.matFromArray(3, 3, cv.CV_64F, [lens.fPx, 0, lens.cx, 0, lens.fPx, lens.cy, 0, 0, 1]);
    const D = cv.matFromArray(1, 5, cv.CV_64F, [lens.k1, lens.k2, 0, 0, 0]);
    const maps = [0, 1].map((axis) => {
      const ramp = new Array(W * H);
      for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) ramp[y * W + x] = axis === 0 ? x : y;
      const src = cv.matFromArray(H, W, cv.CV_32F, ramp);
      const dst = new cv.Mat();
      cv.undistort(src, dst, K, D);
      const out = Float32Array.from(dst.data32F as Float32Array);
      src.delete(); dst.delete();
      return out;
    });
    K.delete(); D.delete();
    let checked = 0;
    for (const [u, v] of [[300, 120], [20, 220], [160, 10], [250, 200], [60, 40]] as const) {
      const [du, dv] = distortPx(lens, u, v);
      expect(Math.abs(maps[0]![v * W + u]! - du)).toBeLessThan(0.05);
      expect(Math.abs(maps[1]![v * W + u]! - dv)).toBeLessThan(0.05);
      checked++;
    }
    expect(checked).toBe(5);
  });

  it('undistorts what it distorts', () => {
    const lens: Lens = { fPx: 3000, cx: 2000, cy: 1500, k1: -0.08, k2: 0.02 };
    for (const [u, v] of [[0, 0], [4000, 3000], [2500, 100]] as const) {
      const [a, b] = distortPx(lens, u, v);
      const [x, y] = undistortPx(lens, a, b, 20);
      expect(Math.hypot(x - u, y - v)).toBeLessThan(1e-6);
    }
  });
});

describe('pinhole projection', () => {
  it('looks straight down with the bed front at the bottom of the photo', () => {
    const cam = { ...lookAt([500, 500, 1000], [500, 500, 0]), fPx: 1000, cx: 500, cy: 500, k1: 0, k2: 0 };
    expect(projectBedPoint(cam, 500, 500)).toEqual([500, 500]);
    const right = projectBedPoint(cam, 600, 500)!, away = projectBedPoint(cam, 500, 600)!;
    expect(right[0]).toBeCloseTo(600, 9); // +X → image right
    expect(away[1]).toBeCloseTo(400, 9); // +Y (away from the operator) → image up
  });

  it('recovers the focal length of a tilted view from a metric homography (Zhang 2000)', () => {
    const f = 2800;
    const cam = { ...lookAt([900, -300, 1400], [600, 500, 0]), fPx: f, cx: 2000, cy: 1500, k1: 0, k2: 0 };
    const plane: Pt[] = [[0, 0], [1200, 0], [1200, 1000], [0, 1000], [600, 500]];
    const h = homographyDlt(plane, plane.map((p) => projectBedPoint(cam, p[0], p[1])!));
    expect(focalFromHomography(h, 2000, 1500)! / f).toBeCloseTo(1, 6);
    // Straight down, the constraint cannot decide f: no number rather than a wrong one.
    const top = { ...lookAt([600, 500, 1400], [600, 500, 0]), fPx: f, cx: 2000, cy: 1500, k1: 0, k2: 0 };
    const h2 = homographyDlt(plane, plane.map((p) => projectBedPoint(top, p[0], p[1])!));
    expect(focalFromHomography(h2, 2000, 1500)).toBeNull();
  });

  it("puts a circle's image centroid at the centre of its image ellipse, off the image of its centre", () => {
    // Hartley & Zisserman (2004) result 2.13: under x' = Hx a conic C maps to H⁻ᵀ C H⁻¹; an ellipse's centre is the
    // pole of the line at infinity, C⁻¹ (0, 0, 1)ᵀ, and its area centroid (it is symmetric about it).
    const cam = { ...lookAt([900, -600, 900], [400, 300, 0]), fPx: 2500, cx: 2000, cy: 1500, k1: 0, k2: 0 };
    const plane: Pt[] = [[0, 0], [800, 0], [800, 600], [0, 600], [400, 300]];
    const H = homographyDlt(plane, plane.map((p) => projectBedPoint(cam, p[0], p[1])!)) as Mat3;
    const [x0, y0, R] = [650, 520, 15];
    // the circle (x − x0)² + (y − y0)² = R² as a symmetric 3 × 3 conic, mapped into the image
    const C = [1, 0, -x0, 0, 1, -y0, -x0, -y0, x0 * x0 + y0 * y0 - R * R];
    const Hi = mat3Inv(H);
    const mul = (a: number[], b: number[]) => [0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => a[3 * i]! * b[j]! + a[3 * i + 1]! * b[3 + j]! + a[3 * i + 2]! * b[6 + j]!));
    const HiT = [Hi[0], Hi[3], Hi[6], Hi[1], Hi[4], Hi[7], Hi[2], Hi[5], Hi[8]];
    const Ci = mat3Inv(mul(mul(HiT, C), Hi) as Mat3);
    const centre = [Ci[2] / Ci[8], Ci[5] / Ci[8]];
    const got = discImageCentroidPx((x, y) => applyH(H, x, y), x0, y0, R);
    const ofCentre = applyH(H, x0, y0);
    // a real shift, which the polygon of rim points finds to a small part of it (5 % of the 0.05 px a 20 mm hole
    // shows at 0.38 mm/px is a quarter of the smallest centre scatter seen in rendered photos, 0.01 px)
    const shift = Math.hypot(centre[0]! - ofCentre[0], centre[1]! - ofCentre[1]);
    expect(shift).toBeGreaterThan(0.05);
    expect(Math.hypot(got[0] - centre[0]!, got[1] - centre[1]!)).toBeLessThan(0.05 * shift);
  });
});
