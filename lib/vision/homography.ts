/**
 * Plane homographies (3 × 3, row-major, h[8] normalised to 1): from four point pairs (direct linear transform,
 * Hartley & Zisserman §4.1), applied to a point, inverted, and its local scale.
 * Units follow the caller: here the source plane is the reference square's frame in mm and the target the image
 * in px.
 */

export type H3 = number[];

/** Solves A x = b for a small dense square system by Gaussian elimination with partial pivoting. */
function solve(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i]!]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r]![c]!) > Math.abs(M[p]![c]!)) p = r;
    [M[c], M[p]] = [M[p]!, M[c]!];
    const piv = M[c]![c]!;
    if (Math.abs(piv) < 1e-14) throw new Error('degenerate homography');
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = M[r]![c]! / piv;
      if (f === 0) continue;
      for (let k = c; k <= n; k++) M[r]![k]! -= f * M[c]![k]!;
    }
  }
  return M.map((row, i) => row[n]! / row[i]!);
}

/** The homography mapping src[i] → dst[i] for exactly four correspondences (no three collinear). */
export function homographyFrom4(src: readonly (readonly [number, number])[], dst: readonly (readonly [number, number])[]): H3 {
  // normalise for conditioning (Hartley & Zisserman §4.4)
  const norm = (pts: readonly (readonly [number, number])[]) => {
    const mx = pts.reduce((s, p) => s + p[0], 0) / pts.length;
    const my = pts.reduce((s, p) => s + p[1], 0) / pts.length;
    const d = pts.reduce((s, p) => s + Math.hypot(p[0] - mx, p[1] - my), 0) / pts.length || 1;
    const k = Math.SQRT2 / d;
    return { T: [k, 0, -k * mx, 0, k, -k * my, 0, 0, 1], p: pts.map((q) => [k * (q[0] - mx), k * (q[1] - my)] as const) };
  };
  const a = norm(src);
  const b = norm(dst);
  const A: number[][] = [];
  const rhs: number[] = [];
  for (let i = 0; i < 4; i++) {
    const [x, y] = a.p[i]!;
    const [u, v] = b.p[i]!;
    A.push([x, y, 1, 0, 0, 0, -u * x, -u * y]);
    rhs.push(u);
    A.push([0, 0, 0, x, y, 1, -v * x, -v * y]);
    rhs.push(v);
  }
  const h = [...solve(A, rhs), 1];
  // H = Tb⁻¹ Hn Ta
  const Hn = h;
  const Tbi = invertH(b.T);
  return normalise(mulH(mulH(Tbi, Hn), a.T));
}

export function mulH(a: H3, b: H3): H3 {
  const o: number[] = [];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) o.push(a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!);
  return o;
}

function normalise(h: H3): H3 {
  const s = h[8]!;
  return h.map((v) => v / s);
}

export function invertH(h: H3): H3 {
  const [a, b, c, d, e, f, g, k, l] = h as [number, number, number, number, number, number, number, number, number];
  const A = e * l - f * k;
  const B = -(d * l - f * g);
  const C = d * k - e * g;
  const det = a * A + b * B + c * C;
  return normalise([A / det, -(b * l - c * k) / det, (b * f - c * e) / det, B / det, (a * l - c * g) / det, -(a * f - c * d) / det, C / det, -(a * k - b * g) / det, (a * e - b * d) / det]);
}

/** Applies h to (x, y). */
export function applyH(h: H3, x: number, y: number): [number, number] {
  const w = h[6]! * x + h[7]! * y + h[8]!;
  return [(h[0]! * x + h[1]! * y + h[2]!) / w, (h[3]! * x + h[4]! * y + h[5]!) / w];
}

/** Local linear scale of h at (x, y): sqrt of the Jacobian determinant (target units per source unit). */
export function localScale(h: H3, x: number, y: number): number {
  const e = 1e-3;
  const p = applyH(h, x, y);
  const px = applyH(h, x + e, y);
  const py = applyH(h, x, y + e);
  const det = ((px[0] - p[0]) * (py[1] - p[1]) - (px[1] - p[1]) * (py[0] - p[0])) / (e * e);
  return Math.sqrt(Math.abs(det));
}
