import { describe, expect, it } from 'vitest';
import { rigid2, umeyama } from '@/lib/geometry/umeyama';
import { decomposeAffine, composeAffine, fitAffine } from '@/lib/geometry/affine';

describe('umeyama', () => {
  it("reproduces the worked example of Umeyama's 1991 paper (with the reflection correction)", () => {
    // Source: S. Umeyama, IEEE PAMI 13(4) 1991, section IV example: x = (0,0),(1,0),(0,2); y = (0,0),(−1,0),(0,2)
    // → c = 0.721, R = [[0.832, 0.555], [−0.555, 0.832]], t = (−0.800, 0.400).
    const r = umeyama([[0, 0], [1, 0], [0, 2]], [[0, 0], [-1, 0], [0, 2]]);
    expect(r.c).toBeCloseTo(0.721, 3);
    expect(r.R[0]![0]).toBeCloseTo(0.832, 3);
    expect(r.R[0]![1]).toBeCloseTo(0.555, 3);
    expect(r.R[1]![0]).toBeCloseTo(-0.555, 3);
    expect(r.R[1]![1]).toBeCloseTo(0.832, 3);
    expect(r.t[0]).toBeCloseTo(-0.8, 3);
    expect(r.t[1]).toBeCloseTo(0.4, 3);
    // The rotation is proper (det +1), not the reflection that fits the mirrored points exactly.
    expect(r.R[0]![0]! * r.R[1]![1]! - r.R[0]![1]! * r.R[1]![0]!).toBeCloseTo(1, 9);
  });

  it('recovers a known rigid motion exactly, and the 2-D closed form agrees with the SVD form', () => {
    const th = 0.3, tx = 5, ty = -2;
    const x = [[0, 0], [10, 1], [3, 7], [-4, 2]];
    const y = x.map(([a, b]) => [Math.cos(th) * a! - Math.sin(th) * b! + tx, Math.sin(th) * a! + Math.cos(th) * b! + ty]);
    const r = umeyama(x, y, { withScale: false });
    expect(Math.atan2(r.R[1]![0]!, r.R[0]![0]!)).toBeCloseTo(th, 12);
    const q = rigid2(x.flat(), y.flat(), 4);
    expect(q.angleRad).toBeCloseTo(th, 12);
    expect(q.tx).toBeCloseTo(tx, 10);
    expect(q.ty).toBeCloseTo(ty, 10);
  });
});

describe('affine decomposition', () => {
  it('round-trips rotation, scale X, scale Y and squareness', () => {
    const t = { rotationRad: 0.2, scaleX: 1.001, scaleY: 0.9995, squarenessRad: 0.05 * (Math.PI / 180) };
    const d = decomposeAffine(composeAffine(t));
    expect(d.rotationRad).toBeCloseTo(t.rotationRad, 12);
    expect(d.scaleX).toBeCloseTo(t.scaleX, 12);
    expect(d.scaleY).toBeCloseTo(t.scaleY, 12);
    expect(d.squarenessRad).toBeCloseTo(t.squarenessRad, 12);
  });

  it('measures squareness as the angle between the mapped axes minus 90°', () => {
    // A pure shear x' = x + 0.01 y tilts the Y axis toward +X: the axes close up by atan(0.01).
    const a = fitAffine([[0, 0], [1, 0], [0, 1], [1, 1]], [[0, 0], [1, 0], [0.01, 1], [1.01, 1]]);
    expect(decomposeAffine(a.L).squarenessRad).toBeCloseTo(-Math.atan(0.01), 12);
  });
});

describe('RANSAC', () => {
  it('finds the homography of 70 % inliers among gross outliers (seeded)', async () => {
    const { ransac } = await import('@/lib/geometry/robust');
    const { homographyDlt } = await import('@/lib/geometry/homography');
    const { applyH } = await import('@/lib/geometry/linalg');
    const { mulberry32 } = await import('@/lib/geometry/random');
    const rand = mulberry32(3);
    const H = [1.1, 0.05, 20, -0.03, 0.95, 5, 1e-4, 5e-5, 1] as const;
    const src: [number, number][] = [], dst: [number, number][] = [];
    for (let i = 0; i < 100; i++) {
      const x = rand() * 500, y = rand() * 400;
      src.push([x, y]);
      dst.push(i % 10 < 7 ? applyH([...H], x, y) : [rand() * 600, rand() * 500]);
    }
    const r = ransac(100, 4, (ix) => homographyDlt(ix.map((k) => src[k]!), ix.map((k) => dst[k]!)), (h, k) => {
      const p = applyH(h, src[k]![0], src[k]![1]);
      return Math.hypot(p[0] - dst[k]![0], p[1] - dst[k]![1]);
    }, 0.5, { iterations: 200, seed: 5 })!;
    expect(r.inliers.length).toBe(70);
    expect(r.inliers.every((k) => k % 10 < 7)).toBe(true);
  });
});
