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

/** A signed figure to `d` places; one that rounds to zero carries no sign (no "−0.00"). */
const signed = (v: number, d: number) => { const r = Number(v.toFixed(d)); return `${r > 0 ? '+' : r < 0 ? '−' : ''}${Math.abs(r).toFixed(d)}`; };
const fmt = (mm: number) => `${signed(mm, 2)} mm (${signed(mm / MM_PER_IN, 3)} in)`;

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

/** Where a panel stands: sits off and should be reseated, in place, or not placed (too few of its holes seen). */
export type PanelState = 'reseat' | 'in-place' | 'not-placed';

/**
 * A panel found at (dx, dy) mm, turned `rotationDeg`, with 1σ `uncertaintyMm`: `not-placed` when that 1σ is as large
 * as the panel; `reseat` when its corners (of `outline`, mm; without one its centre, the least they can move) move
 * more than half the tightest tolerance `minTolMm` and more than twice its 1σ; else `in-place`.
 */
export function panelState(q: Pick<Report['panels'][number], 'dx' | 'dy' | 'rotationDeg' | 'uncertaintyMm'>, outline: { widthMm: number; heightMm: number } | null, minTolMm: number): PanelState {
  const [w, h] = outline ? [outline.widthMm, outline.heightMm] : [0, 0];
  if (outline && q.uncertaintyMm >= Math.hypot(w, h)) return 'not-placed';
  const s = panelCornerShift(w, h, q.dx, q.dy, (q.rotationDeg * Math.PI) / 180);
  return s > 0.5 * minTolMm && s > 2 * q.uncertaintyMm ? 'reseat' : 'in-place';
}

/** What would settle the overall size when the reference cannot. */
const SETTLE = 'a larger reference target, or a measured distance between two far-apart positions, would settle it';

/**
 * Writes a length given in mm: the measurement core writes "0.12 mm" (`suffix: false`: "0.12"); the report's
 * surfaces pass one that writes the reader's unit (lib/report/units.ts), so the words are the same in mm and inches.
 */
export type LengthWriter = (mm: number, opts?: { suffix?: boolean }) => string;
const mmWriter: LengthWriter = (mm, opts) => `${mm.toFixed(2)}${opts?.suffix === false ? '' : ' mm'}`;

/** Overall size and squareness in one sentence, from the shape check (mm), lengths written by `len`. */
export function shapeSentence(c: ReportShapeCheck, len: LengthWriter = mmWriter): string {
  const allowed = `${len(c.toleranceMm)} allowed`;
  if (c.worstMm === null || c.uncertaintyMm === null) return `Overall size and squareness: not measured, the reference could not observe them; ${SETTLE}.`;
  const fig = `${len(c.worstMm, { suffix: false })} ± ${len(bandRadiusMm(c.uncertaintyMm))} (95 %)`;
  if (c.verdict === 'in') return `Overall size and squareness: within tolerance, they move no position by more than ${fig} against ${allowed}.`;
  if (c.verdict === 'out') return `Overall size and squareness: out, they move positions by up to ${fig} against ${allowed}; a fixture spanning the whole bed will not drop in.`;
  return `Overall size and squareness: this reference cannot judge them to the tolerance (up to ${fig} against ${allowed}); ${SETTLE}.`;
}

/** What the bed's sentence is written from: the verdict already reached and the facts behind it. */
export interface VerdictSentenceInput {
  verdict: 'pass' | 'marginal' | 'fail';
  positions: Report['positions'];
  shape?: ReportShapeCheck | null;
  /** Panels that sit off and should be reseated. */
  reseat: string[];
  /** Positions the photo could show but where no hole was found, of `expected` it could show. */
  unseen: number;
  expected: number;
}

/** "1 of 71 measured positions is", "3 of 71 … are": the verb agrees with the count. */
const ofMeasured = (n: number, of: number) => `${n} of ${of} measured positions ${n === 1 ? 'is' : 'are'}`;

/**
 * The whole bed's verdict and its reasons in one sentence, lengths written by `len`. Positions too close to call on
 * the bed as a whole are named even when the verdict is taken hole to hole (they do not make the bed marginal: the
 * reference, not the bed, often limits them), so the sentence counts what the figures count.
 */
export function verdictSentence(i: VerdictSentenceInput, len: LengthWriter = mmWriter): string {
  const matched = i.positions.filter((p) => p.deviation);
  const withForm = matched.filter((p) => p.form);
  const hasForm = withForm.length > 0;
  const worstOf = (ps: Report['positions'], r: (p: Report['positions'][number]) => number) => ps.reduce((a, b) => (r(a) - a.toleranceMm > r(b) - b.toleranceMm ? a : b));
  const reasons: string[] = [];
  const formOut = withForm.filter((p) => p.form!.verdict === 'out');
  if (formOut.length) {
    const w = worstOf(formOut, (p) => p.form!.r);
    reasons.push(`${ofMeasured(formOut.length, matched.length)} out of tolerance hole to hole (worst ${w.label}, ${len(w.form!.r)} off against ${len(w.toleranceMm)} allowed)`);
  }
  const out = i.positions.filter((p) => p.verdict === 'out');
  if (out.length) {
    const w = worstOf(out, (p) => p.deviation!.r);
    reasons.push(`${ofMeasured(out.length, matched.length)} out of tolerance ${hasForm ? 'on the bed as a whole ' : ''}(worst ${w.label}, ${len(w.deviation!.r)} off against ${len(w.toleranceMm)} allowed)`);
  }
  if (i.shape?.verdict === 'out' && i.shape.worstMm !== null) reasons.push(`the overall size and squareness move positions by up to ${len(i.shape.worstMm)} against ${len(i.shape.toleranceMm)} allowed`);
  const tooClose = (n: number, where: string) => `${n} ${n === 1 ? 'is' : 'are'} too close to the tolerance to call${where}`;
  const marginal = i.positions.filter((p) => p.verdict === 'marginal').length;
  const formMarginal = withForm.filter((p) => p.form!.verdict === 'marginal').length;
  if (hasForm ? formMarginal : marginal) reasons.push(tooClose(hasForm ? formMarginal : marginal, hasForm ? ' hole to hole' : ''));
  if (i.reseat.length) reasons.push(`${i.reseat.join(', ')} ${i.reseat.length === 1 ? 'sits' : 'sit'} off and should be reseated`);
  if (i.expected > 0 && i.unseen > 0.1 * i.expected) reasons.push(`${i.unseen} of ${i.expected} positions ${i.unseen === 1 ? 'was' : 'were'} not seen`);
  const alsoBed = hasForm && marginal ? tooClose(marginal, ' on the bed as a whole') : null;
  if (i.verdict === 'pass') {
    const rs = hasForm ? withForm.map((p) => p.form!.r) : matched.map((p) => p.deviation!.r);
    const rms = rs.length ? Math.sqrt(rs.reduce((s, r) => s + r * r, 0) / rs.length) : 0;
    const figures = `(RMS ${len(rms)}, worst ${len(rs.length ? Math.max(...rs) : 0)})`;
    const all = matched.length === 1 ? 'the 1 measured position is' : `all ${matched.length} measured positions are`;
    return `Pass: ${all} within tolerance ${hasForm ? `hole to hole ${figures}` : figures}${alsoBed ? `; ${alsoBed}` : ''}${i.unseen > 0 ? `, ${i.unseen} not seen` : ''}.`;
  }
  if (alsoBed) reasons.push(alsoBed);
  const head = i.verdict === 'marginal' ? 'Marginal' : 'Fail';
  return `${head}: ${reasons.length ? reasons.join('; ') : 'see the figures below'}.`;
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
    return !P.implicit && panelState(q, { widthMm: P.width, heightMm: P.height }, minTol) === 'reseat';
  });
  const shapeOut = shape?.verdict === 'out';
  const close = hasForm ? formMarginal : marginal;
  const lowCover = expected > 0 && unseen > 0.1 * expected;
  const verdict: 'pass' | 'marginal' | 'fail' = out.length || formOut.length || shapeOut ? 'fail' : close.length || reseat.length || lowCover ? 'marginal' : 'pass';
  const sentence = verdictSentence({ verdict, positions, shape, reseat: reseat.map((q) => q.id), unseen, expected });
  return {
    matched: matched.length, missing: missing.length, rmsMm: rms, maxMm: max, out: out.length, marginal: marginal.length, verdict, sentence,
    ...(hasForm ? { formOut: formOut.length, formMarginal: formMarginal.length } : {}),
    ...(shape ? { shapeSentence: shapeSentence(shape) } : {}),
  };
}
