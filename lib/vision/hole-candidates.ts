/**
 * Hole candidates: dark blobs of the reduced image (opencv-wasm adaptive threshold, contours, moments), kept when
 * their size, mapped onto the bed plane through the square's homography, is near a family's and they are round
 * enough; at most one per family within half its diameter.
 *
 * Frames: reduced image px (`factor` full px each), full image px (origin top-left, +y down, pixel centres at
 * integers), bed plane = the reference square's frame, mm (see target.ts). `H` maps the square frame (mm) to full
 * image px.
 */
import { forEachContour, withContourMats } from './contours';
import { getCv, type CV, type CvMat } from './cv';
import { medianLevel } from './load';
import { applyH, invertHomography, homographyScale, type Mat3 } from '@/lib/geometry/homography';

export interface FamilySize {
  id: string;
  diameterMm: number;
}

/** A dark blob of about a family's size: its centre on the bed plane, mm, and the family it is nearest. */
export interface HoleCandidate {
  x: number;
  y: number;
  fam: FamilySize;
}

/** Nearest family to a diameter (mm) and its relative size error. */
export function nearestFamily(families: FamilySize[], diameterMm: number): { fam: FamilySize | undefined; err: number } {
  let fam: FamilySize | undefined;
  let err = Infinity;
  for (const f of families) {
    const e = Math.abs(diameterMm / f.diameterMm - 1);
    if (e < err) {
      err = e;
      fam = f;
    }
  }
  return { fam, err };
}

function insidePoly(poly: [number, number][], x: number, y: number): boolean {
  let inside = false;
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const [xi, yi] = poly[i]!;
    const [xj, yj] = poly[j]!;
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/**
 * Candidates bucketed on the bed plane (cells of half the largest diameter) so that "is one near?" looks at 3 × 3
 * cells. Only a candidate of the same family counts: an insert's flange ring taken for a larger family must not
 * hide the bore at its centre (refinement then keeps the one that is a hole).
 */
class CandidateGrid {
  private readonly cells = new Map<number, { x: number; y: number; fam: string }[]>();
  constructor(private readonly cell: number) {}
  private key(i: number, j: number): number {
    return i * 1_000_003 + j;
  }
  near(x: number, y: number, dist: number, fam: string): boolean {
    const i0 = Math.floor(x / this.cell);
    const j0 = Math.floor(y / this.cell);
    for (let i = i0 - 1; i <= i0 + 1; i++)
      for (let j = j0 - 1; j <= j0 + 1; j++) {
        const b = this.cells.get(this.key(i, j));
        if (b && b.some((q) => q.fam === fam && Math.hypot(q.x - x, q.y - y) < dist)) return true;
      }
    return false;
  }
  add(x: number, y: number, fam: string): void {
    const k = this.key(Math.floor(x / this.cell), Math.floor(y / this.cell));
    const bucket = this.cells.get(k);
    if (bucket) bucket.push({ x, y, fam });
    else this.cells.set(k, [{ x, y, fam }]);
  }
}

interface BlobScale {
  factor: number;
  H: Mat3;
  Hi: Mat3;
  families: FamilySize[];
  minArea: number;
  exclude: [number, number][] | undefined;
}

/** One contour as a candidate: its centre on the bed plane and nearest family, or null (speck, not round, no family near its size). */
function blobCandidate(cv: CV, c: CvMat, k: BlobScale): HoleCandidate | null {
  // a closed chain of n pixel steps (each ≤ √2 px) encloses at most n²/(2π) px²: skip the specks unmeasured
  if ((c.rows * c.rows) / (2 * Math.PI) < k.minArea) return null;
  const m = cv.moments(c, false) as { m00: number; m10: number; m01: number };
  const area = m.m00;
  if (area < k.minArea) return null;
  const u = (m.m10 / m.m00) * k.factor + (k.factor - 1) / 2;
  const v = (m.m01 / m.m00) * k.factor + (k.factor - 1) / 2;
  const b = applyH(k.Hi, u, v);
  if (k.exclude && insidePoly(k.exclude, b[0], b[1])) return null;
  const sl = homographyScale(k.H, b[0], b[1]) / k.factor;
  const peri = cv.arcLength(c, true) as number;
  const circ = (4 * Math.PI * area) / (peri * peri);
  if (circ < 0.5) return null;
  // equivalent diameter in mm; a contour's polygon area misses about half a pixel rim
  const dMm = (2 * Math.sqrt(area / Math.PI) + 1) / sl;
  const { fam: best, err: bestErr } = nearestFamily(k.families, dMm);
  return best && bestErr < 0.5 ? { x: b[0], y: b[1], fam: best } : null;
}

/**
 * Finds hole candidates. `small` is the grey image reduced by `factor` from the full `w` × `h` image; H maps the
 * square frame (mm) to full image px; `exclude` is a convex polygon on the bed plane (mm) where none are sought.
 */
export async function findCandidates(small: { data: Uint8Array; width: number; height: number }, factor: number, w: number, h: number, H: Mat3, families: FamilySize[], exclude?: [number, number][]): Promise<HoleCandidate[]> {
  const Hi = invertHomography(H);
  const { cv } = await getCv();
  const centre = applyH(Hi, w / 2, h / 2);
  const s0 = homographyScale(H, centre[0], centre[1]);
  const maxD = Math.max(...families.map((f) => f.diameterMm));
  const block = Math.max(11, Math.round((2.6 * maxD * s0) / factor)) | 1;
  // Bright things (the paper sheet, flanges, chips) would raise the local mean and make the surface next to them
  // read as dark: clip the image just above the surface's level (its median) before the adaptive threshold.
  const med = medianLevel(small.data, 7);
  const clip = Math.min(255, Math.round(med * 1.12 + 4));
  const clipped = new Uint8Array(small.data.length);
  for (let i = 0; i < clipped.length; i++) clipped[i] = Math.min(clip, small.data[i]!);
  const minD = Math.min(...families.map((f) => f.diameterMm));
  const scale: BlobScale = { factor, H, Hi, families, minArea: Math.max(4, 0.25 * Math.PI * ((minD * s0 * 0.35) / factor) ** 2), exclude };
  const cands: HoleCandidate[] = [];
  const grid = new CandidateGrid(0.5 * maxD);
  withContourMats(cv, clipped, small.width, small.height, ({ src, bin, contours, hier }) => {
    // Two offsets: a mild one, and a strict one that parts a dark bore from a flange darker than the surface
    // (brass on light plywood); a hole found twice is one detection after refinement.
    for (const offset of [8, Math.max(20, Math.round(0.3 * med))]) {
      cv.adaptiveThreshold(src, bin, 255, cv.ADAPTIVE_THRESH_MEAN_C, cv.THRESH_BINARY_INV, block, offset);
      cv.findContours(bin, contours, hier, cv.RETR_LIST, cv.CHAIN_APPROX_NONE);
      forEachContour(contours, (c) => {
        const k = blobCandidate(cv, c, scale);
        if (!k || grid.near(k.x, k.y, 0.5 * k.fam.diameterMm, k.fam.id)) return;
        cands.push(k);
        grid.add(k.x, k.y, k.fam.id);
      });
    }
  });
  return cands;
}
