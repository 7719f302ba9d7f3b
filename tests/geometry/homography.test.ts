import { describe, expect, it } from 'vitest';
import { loadCv } from './opencv';
import { fitHomography, homographyDlt, homographyFrom4, homographyScale, invertHomography, type Pt } from '@/lib/geometry/homography';
import { applyH } from '@/lib/geometry/linalg';
import { mulberry32, normalFrom } from '@/lib/geometry/random';

describe('homography', () => {
  it("matches scikit-image's four-point rectification example", () => {
    // Source: scikit-image gallery, "Using geometric transformations" / projective rectification example:
    // (129,72), (302,76), (90,185), (326,193) → corners of a 400 px square; H[0] ≈ 3.04026872, 1.04929628, −467.743998.
    const src: Pt[] = [[129, 72], [302, 76], [90, 185], [326, 193]];
    const dst: Pt[] = [[0, 0], [400, 0], [0, 400], [400, 400]];
    const h = homographyDlt(src, dst);
    expect(h[0]).toBeCloseTo(3.04026872, 5);
    expect(h[1]).toBeCloseTo(1.04929628, 5);
    expect(h[2]).toBeCloseTo(-467.743998, 3);
    src.forEach((p, i) => { const q = applyH(h, p[0], p[1]); expect(q[0]).toBeCloseTo(dst[i]![0], 6); expect(q[1]).toBeCloseTo(dst[i]![1], 6); });
  });

  it("agrees with opencv-wasm's findHomography on noisy points", () => {
    // Independent library: OpenCV 4.3 (opencv-wasm) findHomography, method 0 (least squares + LM refinement).
    const cv = loadCv();
    const rand = mulberry32(7), g = normalFrom(rand);
    const truth = [1.2, 0.1, 30, -0.05, 1.1, 12, 2e-4, -1e-4, 1] as const;
    const src: Pt[] = [], dst: Pt[] = [];
    for (let i = 0; i < 60; i++) {
      const x = rand() * 1000, y = rand() * 800;
      const w = truth[6] * x + truth[7] * y + 1;
      src.push([x, y]);
      dst.push([(truth[0] * x + truth[1] * y + truth[2]) / w + 0.5 * g(), (truth[3] * x + truth[4] * y + truth[5]) / w + 0.5 * g()]);
    }
    const ours = fitHomography(src, dst);
    const sm = cv.matFromArray(src.length, 1, cv.CV_64FC2, src.flat());
    const dm = cv.matFromArray(dst.length, 1, cv.CV_64FC2, dst.flat());
    const H = cv.findHomography(sm, dm);
    const theirs = Array.from(H.data64F as Float64Array);
    sm.delete(); dm.delete(); H.delete();
    const t = theirs.map((v) => v / theirs[8]!) as unknown as Parameters<typeof applyH>[0];
    let maxDiff = 0;
    for (const [x, y] of [[0, 0], [1000, 0], [0, 800], [1000, 800], [500, 400]] as const) {
      const a = applyH(ours, x, y), b = applyH(t, x, y);
      maxDiff = Math.max(maxDiff, Math.hypot(a[0] - b[0], a[1] - b[1]));
    }
    expect(maxDiff).toBeLessThan(0.02);
  });
});

describe('four-point homography, inverse and local scale', () => {
  // Source: Hartley & Zisserman, Multiple View Geometry, 2nd ed., §2.3 (four pairs, no three collinear, fix H
  // exactly) and §4.1; the Jacobian of x ↦ Hx/(h₃ᵀx) from the quotient rule.
  const src: Pt[] = [[0, 0], [50, 0], [50, 50], [0, 50]];
  const dst: Pt[] = [[1012, 804], [1620, 790], [1655, 1420], [980, 1390]];

  it('maps each of the four source points exactly onto its destination', () => {
    const h = homographyFrom4(src, dst);
    src.forEach((p, i) => { const q = applyH(h, p[0], p[1]); expect(q[0]).toBeCloseTo(dst[i]![0], 8); expect(q[1]).toBeCloseTo(dst[i]![1], 8); });
  });

  it('agrees with opencv-wasm getPerspectiveTransform', () => {
    // Independent library: OpenCV 4.3 (opencv-wasm) getPerspectiveTransform, the exact four-point solve.
    const cv = loadCv();
    const sm = cv.matFromArray(4, 1, cv.CV_32FC2, src.flat());
    const dm = cv.matFromArray(4, 1, cv.CV_32FC2, dst.flat());
    const H = cv.getPerspectiveTransform(sm, dm);
    const theirs = Array.from(H.data64F as Float64Array);
    sm.delete(); dm.delete(); H.delete();
    const ours = homographyFrom4(src, dst);
    theirs.forEach((v, i) => expect(ours[i]!).toBeCloseTo(v / theirs[8]!, 6));
  });

  it('refuses a quadrilateral with three collinear corners', () => {
    expect(() => homographyFrom4([[0, 0], [1, 0], [2, 0], [0, 1]], dst)).toThrow(RangeError);
  });

  it('inverts back to the source points', () => {
    const hi = invertHomography(homographyFrom4(src, dst));
    expect(hi[8]).toBe(1);
    dst.forEach((p, i) => { const q = applyH(hi, p[0], p[1]); expect(q[0]).toBeCloseTo(src[i]![0], 8); expect(q[1]).toBeCloseTo(src[i]![1], 8); });
  });

  it('gives a scale equal to the square root of the area ratio of a small patch', () => {
    const h = homographyFrom4(src, dst);
    const e = 1e-4, [x, y] = [20, 30];
    const a = applyH(h, x, y), b = applyH(h, x + e, y), c = applyH(h, x, y + e);
    const area = Math.abs((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])) / (e * e);
    expect(homographyScale(h, x, y)).toBeCloseTo(Math.sqrt(area), 4);
  });
});
