import { describe, expect, it } from 'vitest';
import { refineCorners, type Corners } from '@/lib/vision/square';

/**
 * An exactly known synthetic square: a dark quadrilateral on a light ground where each pixel's grey is the exact
 * fraction of its area inside the quad (16 × 16 sub-samples per pixel), encoded with the sRGB curve (IEC
 * 61966-2-1) as a camera would. The refined corners must land on the true ones.
 */
function srgb(l: number): number {
  return l <= 0.0031308 ? 12.92 * l : 1.055 * l ** (1 / 2.4) - 0.055;
}

function renderQuad(w: number, h: number, q: Corners): Float32Array {
  const g = new Float32Array(w * h);
  const inside = (x: number, y: number) => {
    let s = 0;
    for (let i = 0; i < 4; i++) {
      const a = q[i]!;
      const b = q[(i + 1) % 4]!;
      const cr = (b[0] - a[0]) * (y - a[1]) - (b[1] - a[1]) * (x - a[0]);
      if (s === 0) s = Math.sign(cr);
      else if (Math.sign(cr) !== s) return false;
    }
    return true;
  };
  const n = 16;
  const minX = Math.floor(Math.min(...q.map((p) => p[0]))) - 2;
  const maxX = Math.ceil(Math.max(...q.map((p) => p[0]))) + 2;
  const minY = Math.floor(Math.min(...q.map((p) => p[1]))) - 2;
  const maxY = Math.ceil(Math.max(...q.map((p) => p[1]))) + 2;
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      let cover = 0;
      if (x >= minX && x <= maxX && y >= minY && y <= maxY) {
        for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) if (inside(x - 0.5 + (i + 0.5) / n, y - 0.5 + (j + 0.5) / n)) cover++;
      }
      const f = cover / (n * n);
      g[y * w + x] = 255 * srgb(0.8 * (1 - f) + 0.03 * f);
    }
  return g;
}

describe('sub-pixel corners of the reference square', () => {
  it('puts the corners of an exactly known, perspective-distorted square within 0.05 px', () => {
    const w = 320;
    const h = 280;
    const truth: Corners = [[60.37, 210.81], [243.62, 221.18], [262.09, 48.55], [81.73, 41.26]];
    const g = renderQuad(w, h, truth);
    // start from corners off by up to 2 px, as the reduced-resolution search delivers them
    const start: Corners = [[61.9, 209.2], [242.1, 222.6], [263.8, 47.1], [80.2, 42.9]];
    const r = refineCorners(g, w, h, start, 6);
    expect(r).not.toBeNull();
    for (let i = 0; i < 4; i++) {
      expect(Math.hypot(r!.corners[i]![0] - truth[i]![0], r!.corners[i]![1] - truth[i]![1])).toBeLessThan(0.05);
    }
  });
});
