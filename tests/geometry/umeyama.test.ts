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
