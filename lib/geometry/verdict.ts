/**
 * Verdicts. Per position (bed frame, mm): `in` when the deviation's 95 % band (r ± 2.448σ, the 2-D radius of
 * band.ts) lies below the radial tolerance, `out` when it lies above, `marginal` when the tolerance falls inside it, `missing` when the
 * position was expected but not seen. Per panel: the move that puts it back, in mm and inches. Whole bed: pass,
 * marginal or fail, with the reasons in one sentence.
 */
import { MM_PER_IN, type Report, type Verdict } from './contract';
import { bandRadiusMm } from './band';
import type { Lattice } from './lattice';

/** Verdict of a position with deviation r (mm), per-axis 1σ uncertainty u (mm) and radial tolerance t (mm). */
export function positionVerdict(rMm: number, uMm: number, tolMm: number): Verdict {
  const bandMm = bandRadiusMm(uMm);
  if (rMm + bandMm <= tolMm) return 'in';
  if (rMm - bandMm > tolMm) return 'out';
  return 'marginal';
}

const fmt = (mm: number) => `${mm >= 0 ? '+' : '−'}${Math.abs(mm).toFixed(2)} mm (${mm >= 0 ? '+' : '−'}${Math.abs(mm / MM_PER_IN).toFixed(3)} in)`;

/** The correction for a panel found at offset (dx, dy) mm and turned rotDeg (counter-clockwise, seen from above). */
export function panelCorrection(dxMm: number, dyMm: number, rotDeg: number): string {
  const turn = -rotDeg;
  const dir = turn >= 0 ? 'counter-clockwise' : 'clockwise';
  return `move X by ${fmt(-dxMm)}, Y by ${fmt(-dyMm)}, turn ${Math.abs(turn).toFixed(3)}° ${dir} about its centre`;
}

/** Largest displacement (mm) of a panel's corners from a rigid offset (dx, dy, ρ rad) about its centre. */
export function panelCornerShift(w: number, h: number, dx: number, dy: number, rotRad: number): number {
  let m = 0;
  for (const [ax, ay] of [[-w / 2, -h / 2], [w / 2, -h / 2], [w / 2, h / 2], [-w / 2, h / 2]] as const) m = Math.max(m, Math.hypot(dx - rotRad * ay, dy + rotRad * ax));
  return m;
}

/** Whole-bed summary; `notExpected` marks positions that could not be seen (under the sheet or outside the photo). */
export function bedVerdict(positions: Report['positions'], panels: Report['panels'], lat: Lattice, notExpected: Uint8Array): Report['summary'] {
  const matched = positions.filter((p) => p.measured);
  const rs = matched.map((p) => p.deviation!.r);
  const rms = rs.length ? Math.sqrt(rs.reduce((s, r) => s + r * r, 0) / rs.length) : 0;
  const max = rs.length ? Math.max(...rs) : 0;
  const out = positions.filter((p) => p.verdict === 'out');
  const marginal = positions.filter((p) => p.verdict === 'marginal');
  const missing = positions.filter((p) => p.verdict === 'missing');
  const hiddenN = notExpected.reduce((a, b) => a + b, 0);
  const unseen = missing.length - hiddenN;
  const expected = positions.length - hiddenN;
  const minTol = Math.min(...lat.families.map((f) => f.toleranceMm));
  const reseat = panels.filter((q, j) => {
    const P = lat.panels[j]!;
    if (P.implicit || q.uncertaintyMm >= Math.hypot(P.width, P.height)) return false;
    const s = panelCornerShift(P.width, P.height, q.dx, q.dy, (q.rotationDeg * Math.PI) / 180);
    return s > 0.5 * minTol && s > 2 * q.uncertaintyMm;
  });
  const worst = out.length ? out.reduce((a, b) => (a.deviation!.r - a.toleranceMm > b.deviation!.r - b.toleranceMm ? a : b)) : null;
  const reasons: string[] = [];
  if (worst) reasons.push(`${out.length} of ${matched.length} measured positions are out of tolerance (worst ${worst.label}, ${worst.deviation!.r.toFixed(2)} mm off against ${worst.toleranceMm.toFixed(2)} mm allowed)`);
  if (marginal.length) reasons.push(`${marginal.length} ${marginal.length === 1 ? 'is' : 'are'} too close to the tolerance to call`);
  if (reseat.length) reasons.push(`${reseat.map((q) => q.id).join(', ')} ${reseat.length === 1 ? 'sits' : 'sit'} off and should be reseated`);
  const lowCover = expected > 0 && unseen > 0.1 * expected;
  if (lowCover) reasons.push(`${unseen} of ${expected} positions were not seen`);
  const verdict: 'pass' | 'marginal' | 'fail' = out.length ? 'fail' : marginal.length || reseat.length || lowCover ? 'marginal' : 'pass';
  const head = verdict === 'pass' ? 'Pass' : verdict === 'marginal' ? 'Marginal' : 'Fail';
  const sentence = verdict === 'pass'
    ? `Pass: all ${matched.length} measured positions are within tolerance (RMS ${rms.toFixed(2)} mm, worst ${max.toFixed(2)} mm)${unseen > 0 ? `, ${unseen} not seen` : ''}.`
    : `${head}: ${reasons.join('; ')}.`;
  return { matched: matched.length, missing: missing.length, rmsMm: rms, maxMm: max, out: out.length, marginal: marginal.length, verdict, sentence };
}
