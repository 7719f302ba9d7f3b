/**
 * Circle through points by the Kåsa algebraic fit: least squares on x² + y² + Dx + Ey + F = 0, solved about the
 * points' mean. Any frame; here the bed plane (mm).
 */

/** Centre and radius of the circle nearest the points (same units); null for fewer than 5 points or a degenerate set. */
export function fitCircle(pts: [number, number][]): { cx: number; cy: number; r: number } | null {
  const n = pts.length;
  if (n < 5) return null;
  let mx = 0;
  let my = 0;
  for (const p of pts) {
    mx += p[0];
    my += p[1];
  }
  mx /= n;
  my /= n;
  let suu = 0, suv = 0, svv = 0, suuu = 0, svvv = 0, suvv = 0, svuu = 0;
  for (const p of pts) {
    const u = p[0] - mx;
    const v = p[1] - my;
    suu += u * u;
    suv += u * v;
    svv += v * v;
    suuu += u * u * u;
    svvv += v * v * v;
    suvv += u * v * v;
    svuu += v * u * u;
  }
  const a = 0.5 * (suuu + suvv);
  const b = 0.5 * (svvv + svuu);
  const det = suu * svv - suv * suv;
  if (Math.abs(det) < 1e-12) return null;
  const uc = (a * svv - b * suv) / det;
  const vc = (b * suu - a * suv) / det;
  const r = Math.sqrt(uc * uc + vc * vc + (suu + svv) / n);
  return { cx: uc + mx, cy: vc + my, r };
}
