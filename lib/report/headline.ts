/**
 * The report's headline, the verdict and its reasons in one sentence, and its overall size and squareness line,
 * written in the reader's unit (mm or in) from the report's figures (bed frame, mm) at the moment it is shown. The
 * verdict is the report's own (summary.verdict); the sentences are the measurement core's own (lib/geometry/
 * verdict.ts: `verdictSentence`, `shapeSentence`) with a writer of the reader's unit, so in mm they are the stored
 * ones word for word. The counts are those of lib/report/words.ts: "not seen" counts positions the photo could
 * show, so the headline and the cards agree.
 */
import type { Comparison } from '@/lib/geometry/compare';
import type { Report } from '@/lib/geometry/contract';
import { panelState, shapeSentence, verdictSentence, type LengthWriter, type PanelState } from '@/lib/geometry/verdict';
import { formatLength, type LengthUnit } from './units';
import { BED_VERDICT_WORD, reportCounts } from './words';

/**
 * Where each panel stands (by its id): `reseat` when it sits off, its corners moving more than half the tightest
 * tolerance and more than twice the panel's 1σ; `not-placed` when too few of its holes were seen to place it (its
 * 1σ as large as the panel); `in-place` otherwise, and for the whole bed as its own single panel. Needs the panels'
 * outline (report.pattern.panels); without it a panel's corners are taken to move as its centre, the least they
 * can move, so a panel turned more than shifted may be missed.
 */
export function panelStates(report: Pick<Report, 'positions' | 'panels' | 'pattern'>): Map<string, PanelState> {
  const outline = report.pattern.panels ?? [];
  const k = report.pattern.units === 'in' ? 25.4 : 1;
  const minTol = Math.min(...report.positions.map((p) => p.toleranceMm));
  return new Map(report.panels.map((q): [string, PanelState] => {
    const o = outline.find((p) => p.id === q.id);
    if (!o && outline.length === 0 && report.panels.length === 1 && q.id === 'bed') return [q.id, 'in-place'];
    return [q.id, panelState(q, o ? { widthMm: o.width * k, heightMm: o.height * k } : null, minTol)];
  }));
}

export type { PanelState };

/** The panels that sit off and should be reseated (panelStates), in the report's order. */
export function panelsToReseat(report: Pick<Report, 'positions' | 'panels' | 'pattern'>): string[] {
  const states = panelStates(report);
  return report.panels.filter((q) => states.get(q.id) === 'reseat').map((q) => q.id);
}

/** Writes a length in `unit` for the core's sentences. */
const writer = (unit: LengthUnit): LengthWriter => (mm, opts) => formatLength(mm, unit, opts);

/** The headline sentence of a report in `unit`: the core's sentence (lib/geometry/verdict.ts) from the report's figures. */
export function headline(report: Report, unit: LengthUnit): string {
  const c = reportCounts(report);
  return verdictSentence({ verdict: report.summary.verdict, positions: report.positions, shape: report.lattice.shapeCheck, reseat: panelsToReseat(report), unseen: c.missing, expected: c.inView }, writer(unit));
}

/**
 * The headline for a surface that shows the verdict word above it as a heading (the report and shared pages, the
 * PDF): without its leading "Fail: " / "Pass: " / "Marginal: ", so the word is not said twice; first letter capital.
 */
export function headlineUnderVerdict(report: Report, unit: LengthUnit): string {
  const full = headline(report, unit);
  const lead = `${BED_VERDICT_WORD[report.summary.verdict]}: `;
  if (!full.startsWith(lead)) return full;
  const rest = full.slice(lead.length);
  return rest.charAt(0).toUpperCase() + rest.slice(1);
}

/** The overall size and squareness line in `unit`, or null when the report has none (older reports). */
export function shapeLine(report: Report, unit: LengthUnit): string | null {
  const c = report.lattice.shapeCheck;
  if (!c || !report.summary.shapeSentence) return null;
  return shapeSentence(c, writer(unit));
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
