/**
 * The report's headline, the verdict and its reasons in one sentence, and its overall size and squareness line,
 * written in the reader's unit (mm or in)
 * from the report's figures (bed frame, mm) at the moment it is shown. The verdict is the report's own
 * (summary.verdict); the reasons are the ones the measurement core gives for it, worded the same (lib/geometry/
 * verdict.ts writes the stored sentences in mm; in mm these are those word for word). The counts are
 * those of lib/report/words.ts: "not seen" counts positions the photo could show, so the headline and the
 * cards agree.
 */
import type { Comparison } from '@/lib/geometry/compare';
import type { Report } from '@/lib/geometry/contract';
import { bandRadiusMm } from '@/lib/geometry/band';
import { panelCornerShift } from '@/lib/geometry/verdict';
import { formatLength, type LengthUnit } from './units';
import { BED_VERDICT_WORD, reportCounts } from './words';

type Position = Report['positions'][number];

/**
 * Panels that sit off and should be reseated: their corners move more than half the tightest tolerance and more
 * than twice the panel's 1σ. Needs the panels' outline (report.pattern.panels); without it a panel's corners are
 * taken to move as its centre, the least they can move, so a panel turned more than shifted may be missed.
 */
export function panelsToReseat(report: Pick<Report, 'positions' | 'panels' | 'pattern'>): string[] {
  const outline = report.pattern.panels ?? [];
  const k = report.pattern.units === 'in' ? 25.4 : 1;
  const minTol = Math.min(...report.positions.map((p) => p.toleranceMm));
  return report.panels.filter((q) => {
    const o = outline.find((p) => p.id === q.id);
    const [w, h] = o ? [o.width * k, o.height * k] : [0, 0];
    if ((o && q.uncertaintyMm >= Math.hypot(w, h)) || (!o && outline.length === 0 && report.panels.length === 1 && q.id === 'bed')) return false;
    const s = panelCornerShift(w, h, q.dx, q.dy, (q.rotationDeg * Math.PI) / 180);
    return s > 0.5 * minTol && s > 2 * q.uncertaintyMm;
  }).map((q) => q.id);
}

/** The headline sentence of a report in `unit`. */
export function headline(report: Report, unit: LengthUnit): string {
  const len = (mm: number) => formatLength(mm, unit);
  const c = reportCounts(report);
  const matched = report.positions.filter((p) => p.deviation);
  const withForm = matched.filter((p) => p.form);
  const hasForm = withForm.length > 0;
  const worst = (ps: Position[], r: (p: Position) => number) => ps.reduce((a, b) => (r(a) - a.toleranceMm > r(b) - b.toleranceMm ? a : b));
  const reasons: string[] = [];
  const formOut = withForm.filter((p) => p.form!.verdict === 'out');
  if (formOut.length) {
    const w = worst(formOut, (p) => p.form!.r);
    reasons.push(`${formOut.length} of ${matched.length} measured positions are out of tolerance hole to hole (worst ${w.label}, ${len(w.form!.r)} off against ${len(w.toleranceMm)} allowed)`);
  }
  const out = report.positions.filter((p) => p.verdict === 'out');
  if (out.length) {
    const w = worst(out, (p) => p.deviation!.r);
    reasons.push(`${out.length} of ${matched.length} measured positions are out of tolerance ${hasForm ? 'on the bed as a whole ' : ''}(worst ${w.label}, ${len(w.deviation!.r)} off against ${len(w.toleranceMm)} allowed)`);
  }
  const shape = report.lattice.shapeCheck;
  if (shape?.verdict === 'out' && shape.worstMm !== null) reasons.push(`the overall size and squareness move positions by up to ${len(shape.worstMm)} against ${len(shape.toleranceMm)} allowed`);
  const close = hasForm ? withForm.filter((p) => p.form!.verdict === 'marginal') : report.positions.filter((p) => p.verdict === 'marginal');
  if (close.length) reasons.push(`${close.length} ${close.length === 1 ? 'is' : 'are'} too close to the tolerance to call${hasForm ? ' hole to hole' : ''}`);
  const reseat = panelsToReseat(report);
  if (reseat.length) reasons.push(`${reseat.join(', ')} ${reseat.length === 1 ? 'sits' : 'sit'} off and should be reseated`);
  if (c.inView > 0 && c.missing > 0.1 * c.inView) reasons.push(`${c.missing} of ${c.inView} positions were not seen`);
  const verdict = report.summary.verdict;
  if (verdict === 'pass') {
    const rs = (hasForm ? withForm.map((p) => p.form!.r) : matched.map((p) => p.deviation!.r));
    const rms = rs.length ? Math.sqrt(rs.reduce((s, r) => s + r * r, 0) / rs.length) : 0;
    const figures = `(RMS ${len(rms)}, worst ${len(rs.length ? Math.max(...rs) : 0)})`;
    return `${BED_VERDICT_WORD.pass}: all ${matched.length} measured positions are within tolerance ${hasForm ? `hole to hole ${figures}` : figures}${c.missing > 0 ? `, ${c.missing} not seen` : ''}.`;
  }
  return `${BED_VERDICT_WORD[verdict]}: ${reasons.length ? reasons.join('; ') : 'see the figures below'}.`;
}

/** What would settle the overall size when the reference cannot (the core's words). */
const SETTLE = 'a larger reference target, or a measured distance between two far-apart positions, would settle it';

/** The overall size and squareness line in `unit`, or null when the report has none (older reports). */
export function shapeLine(report: Report, unit: LengthUnit): string | null {
  const c = report.lattice.shapeCheck;
  if (!c || !report.summary.shapeSentence) return null;
  const allowed = `${formatLength(c.toleranceMm, unit)} allowed`;
  if (c.worstMm === null || c.uncertaintyMm === null) return `Overall size and squareness: not measured, the reference could not observe them; ${SETTLE}.`;
  const fig = `${formatLength(c.worstMm, unit, { suffix: false })} ± ${formatLength(bandRadiusMm(c.uncertaintyMm), unit)} (95 %)`;
  if (c.verdict === 'in') return `Overall size and squareness: within tolerance, they move no position by more than ${fig} (${allowed}).`;
  if (c.verdict === 'out') return `Overall size and squareness: out, they move positions by up to ${fig} (${allowed}); a fixture spanning the whole bed will not drop in.`;
  return `Overall size and squareness: this reference cannot judge them to the tolerance (up to ${fig} against ${allowed}); ${SETTLE}.`;
}

/** The comparison's sentence (lib/geometry/compare.ts writes it in mm) in `unit`, from its figures. */
export function comparisonHeadline(cmp: Pick<Comparison, 'positions' | 'panels' | 'summary'>, unit: LengthUnit): string {
  const n = cmp.positions.length;
  const largest = `largest ${formatLength(cmp.summary.maxChangeMm, unit)}`;
  const moved = cmp.panels.filter((p) => p.significant).map((p) => p.id);
  const sig = cmp.positions.filter((c) => c.significant).length;
  return sig === 0 && moved.length === 0
    ? `No change beyond the measurements' uncertainty over ${n} positions (${largest}).`
    : `${sig} of ${n} positions moved beyond the measurements' uncertainty (${largest})${moved.length ? `; panels ${moved.join(', ')} moved` : ''}.`;
}
