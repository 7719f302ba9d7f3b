/**
 * Verdicts. Per position (bed frame, mm): `in` when the deviation's 95 % band (r ± 2.448σ, the 2-D radius of
 * band.ts) lies below the radial tolerance, `out` when it lies above, `marginal` when the tolerance falls inside it, `missing` when the
 * position was expected but not seen. Per panel: the move that puts it back, in mm and inches. Whole bed: pass,
 * marginal or fail, with the reasons in one sentence.
 */
import { MM_PER_IN, type Report, type ReportShapeCheck, type Verdict } from './contract';
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

/** What would settle the overall size when the reference cannot. */
const SETTLE = 'a larger reference target, or a measured distance between two far-apart positions, would settle it';

/** Overall size and squareness in one sentence (mm), from the shape check. */
export function shapeSentence(c: ReportShapeCheck): string {
  const allowed = `${c.toleranceMm.toFixed(2)} mm allowed`;
  if (c.worstMm === null || c.uncertaintyMm === null) return `Overall size and squareness: not measured, the reference could not observe them; ${SETTLE}.`;
  const fig = `${c.worstMm.toFixed(2)} ± ${bandRadiusMm(c.uncertaintyMm).toFixed(2)} mm (95 %)`;
  if (c.verdict === 'in') return `Overall size and squareness: within tolerance, they move no position by more than ${fig} (${allowed}).`;
  if (c.verdict === 'out') return `Overall size and squareness: out, they move positions by up to ${fig} (${allowed}); a fixture spanning the whole bed will not drop in.`;
  return `Overall size and squareness: this reference cannot judge them to the tolerance (up to ${fig} against ${allowed}); ${SETTLE}.`;
}

/**
 * Whole-bed summary; `notExpected` marks positions that could not be seen (under the sheet or outside the photo).
 * Fails on any position out (hole to hole or on the whole bed) or an overall size and squareness out; marginal when a
 * position is too close to call hole to hole, a panel should be reseated or too few positions were seen. A bed is not
 * called marginal only because the reference cannot judge its overall size: `shapeSentence` says so on its own line.
 * Reports without form deviations fall back to the rigid verdicts for marginal.
 */
export function bedVerdict(positions: Report['positions'], panels: Report['panels'], lat: Lattice, notExpected: Uint8Array, shape?: ReportShapeCheck): Report['summary'] {
  const matched = positions.filter((p) => p.measured);
  const rs = matched.map((p) => p.deviation!.r);
  const rms = rs.length ? Math.sqrt(rs.reduce((s, r) => s + r * r, 0) / rs.length) : 0;
  const max = rs.length ? Math.max(...rs) : 0;
  const withForm = matched.filter((p) => p.form);
  const hasForm = withForm.length > 0;
  const fr = withForm.map((p) => p.form!.r);
  const formRms = fr.length ? Math.sqrt(fr.reduce((s, r) => s + r * r, 0) / fr.length) : 0;
  const out = positions.filter((p) => p.verdict === 'out');
  const marginal = positions.filter((p) => p.verdict === 'marginal');
  const formOut = withForm.filter((p) => p.form!.verdict === 'out');
  const formMarginal = withForm.filter((p) => p.form!.verdict === 'marginal');
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
  const worstOf = (ps: Report['positions'], r: (p: Report['positions'][number]) => number) => ps.reduce((a, b) => (r(a) - a.toleranceMm > r(b) - b.toleranceMm ? a : b));
  const reasons: string[] = [];
  if (formOut.length) {
    const w = worstOf(formOut, (p) => p.form!.r);
    reasons.push(`${formOut.length} of ${matched.length} measured positions are out of tolerance hole to hole (worst ${w.label}, ${w.form!.r.toFixed(2)} mm off against ${w.toleranceMm.toFixed(2)} mm allowed)`);
  }
  if (out.length) {
    const w = worstOf(out, (p) => p.deviation!.r);
    reasons.push(`${out.length} of ${matched.length} measured positions are out of tolerance ${hasForm ? 'on the bed as a whole ' : ''}(worst ${w.label}, ${w.deviation!.r.toFixed(2)} mm off against ${w.toleranceMm.toFixed(2)} mm allowed)`);
  }
  const shapeOut = shape?.verdict === 'out';
  if (shapeOut) reasons.push(`the overall size and squareness move positions by up to ${shape.worstMm!.toFixed(2)} mm against ${shape.toleranceMm.toFixed(2)} mm allowed`);
  const close = hasForm ? formMarginal : marginal;
  if (close.length) reasons.push(`${close.length} ${close.length === 1 ? 'is' : 'are'} too close to the tolerance to call${hasForm ? ' hole to hole' : ''}`);
  if (reseat.length) reasons.push(`${reseat.map((q) => q.id).join(', ')} ${reseat.length === 1 ? 'sits' : 'sit'} off and should be reseated`);
  const lowCover = expected > 0 && unseen > 0.1 * expected;
  if (lowCover) reasons.push(`${unseen} of ${expected} positions were not seen`);
  const verdict: 'pass' | 'marginal' | 'fail' = out.length || formOut.length || shapeOut ? 'fail' : close.length || reseat.length || lowCover ? 'marginal' : 'pass';
  const head = verdict === 'pass' ? 'Pass' : verdict === 'marginal' ? 'Marginal' : 'Fail';
  const passFigures = hasForm ? `hole to hole (RMS ${formRms.toFixed(2)} mm, worst ${Math.max(...fr).toFixed(2)} mm)` : `(RMS ${rms.toFixed(2)} mm, worst ${max.toFixed(2)} mm)`;
  const sentence = verdict === 'pass'
    ? `Pass: all ${matched.length} measured positions are within tolerance ${passFigures}${unseen > 0 ? `, ${unseen} not seen` : ''}.`
    : `${head}: ${reasons.join('; ')}.`;
  return {
    matched: matched.length, missing: missing.length, rmsMm: rms, maxMm: max, out: out.length, marginal: marginal.length, verdict, sentence,
    ...(hasForm ? { formOut: formOut.length, formMarginal: formMarginal.length } : {}),
    ...(shape ? { shapeSentence: shapeSentence(shape) } : {}),
  };
}
