import { describe, expect, it } from 'vitest';
import { analyzeImage } from '@/lib/vision';
import { loadRealGrid, PITCH, realGridsPresent, REAL_DIR } from './realgrids';

// Reference: dot centres from native OpenCV 4.6 (cv2.findCirclesGrid, default blob detector), an independent
// library, on real photographs of printed circle grids (../shared/real-grids/README.md).
const present = realGridsPresent();
if (!present) console.warn(`skipping the real-photo tests: ${REAL_DIR} is absent`);

describe.skipIf(!present)('real photographs of printed circle grids', () => {
  for (const name of ['symmetric-7x7-large', 'symmetric-7x7-small', 'asymmetric-7x13']) {
    it(`finds every dot of ${name}, nothing else, within 0.15 px RMS of OpenCV's centres`, async () => {
      const g = loadRealGrid(name);
      const { points, report } = await analyzeImage(g.bytes, g.pattern, { referenceMm: g.sizeMm, corners: g.corners });
      let se = 0;
      const used = new Set<number>();
      for (const r of g.ref) {
        let best = -1;
        let bd = Infinity;
        points.holes.forEach((p, i) => {
          const d = Math.hypot(p.x - r[0], p.y - r[1]);
          if (d < bd) {
            bd = d;
            best = i;
          }
        });
        expect(bd).toBeLessThan(1);
        used.add(best);
        se += bd * bd;
      }
      expect(used.size).toBe(g.ref.length); // every dot, each once
      expect(points.holes.length).toBe(g.ref.length); // nothing spurious
      expect(Math.sqrt(se / g.ref.length)).toBeLessThan(0.15);
      // A flat print is a plane, and a plane maps to the image by a homography (Hartley & Zisserman, Multiple View
      // Geometry, 2nd ed., §2.3 and §13.1 — from memory); with a small radial lens model the lattice fit must leave
      // residuals of about the detection noise. Every dot is matched except those inside the quad used as the
      // reference square (they count as under the sheet), none left over elsewhere.
      const [a, , c] = g.corners;
      const inQuad = (x: number, y: number) => {
        const xs = g.corners.map((q) => q[0]);
        const ys = g.corners.map((q) => q[1]);
        const m = 0.1 * Math.hypot(c[0] - a[0], c[1] - a[1]);
        return x > Math.min(...xs) - m && x < Math.max(...xs) + m && y > Math.min(...ys) - m && y < Math.max(...ys) + m;
      };
      for (const u of report.unmatched) expect(inQuad(u.x, u.y)).toBe(true);
      expect(report.summary.matched + report.unmatched.length).toBe(g.ref.length);
      if (!name.startsWith('asymmetric')) {
        // under 2 % of the 20 mm pitch everywhere
        expect(report.summary.maxMm).toBeLessThan(0.02 * 20);
        return;
      }
      // The asymmetric print (hand-held card, strong perspective) is not a plane to the detection noise: OpenCV 4.6's
      // calibrateCamera, an independent library, fitted to OpenCV's own centres of this photo with every lens term
      // free (k1 k2 k3 p1 p2, principal point, focal) leaves 0.363 px RMS (measured once here, Debian python3-opencv),
      // smoothly varying — a bent card, not noise. Our homography + k1 k2 must do about as well: RMS within 1.3×
      // that, in mm at the photo's mean scale (diagonal neighbours are s√2 apart).
      const nn = g.ref.map((p, i) => Math.min(...g.ref.filter((_, j) => j !== i).map((q) => Math.hypot(q[0] - p[0], q[1] - p[1]))));
      const mmPerPx = (PITCH * Math.SQRT2) / (nn.reduce((x, y) => x + y, 0) / nn.length);
      expect(report.summary.rmsMm).toBeLessThan(1.3 * 0.363 * mmPerPx);
    });
  }
});
