/**
 * The top of a report, the same on the report page and the shared page: the verdict word beside its mark
 * (lib/report/palette.ts), the headline in the reader's unit (lib/report/headline.ts), the overall size and
 * squareness line, and the figure cards with the counts of lib/report/words.ts. Pure (no state, no browser
 * API), so the shared page renders it on the server.
 */
import type { Report } from '@/lib/geometry/contract';
import { headlineUnderVerdict, shapeLine } from '@/lib/report/headline';
import { formatLength, type LengthUnit } from '@/lib/report/units';
import { BED_VERDICT_MARK, BED_VERDICT_WORD, figureCards, reportCounts } from '@/lib/report/words';
import { MarkIcon, markVar } from './Mark';

/** The verdict box: `title` is the bed, check and time line; `heading` the element of the verdict word. */
export function VerdictBox({ report, unit, title, heading: H = 'h2' }: { report: Report; unit: LengthUnit; title: string; heading?: 'h1' | 'h2' }) {
  const s = report.summary;
  const mark = BED_VERDICT_MARK[s.verdict];
  const shape = shapeLine(report, unit);
  return (
    <section className="rounded-xl border-4 bg-card p-5" style={{ borderColor: markVar(mark) }} aria-label="Verdict" data-verdict={s.verdict} data-mark={mark}>
      <p className="text-sm font-bold uppercase tracking-wide text-muted">{title}</p>
      <H className="mt-1 flex items-center gap-2 text-3xl font-bold"><MarkIcon mark={mark} size={30} /><span data-testid="verdict-word">{BED_VERDICT_WORD[s.verdict]}</span></H>
      <p className="mt-2 text-xl font-bold leading-snug text-ink" data-testid="verdict-sentence">{headlineUnderVerdict(report, unit)}</p>
      {shape && <p className="mt-1 leading-snug text-ink" data-testid="shape-sentence">{shape}</p>}
    </section>
  );
}

/** The figures under the verdict: counts and the RMS and largest deviations in the reader's unit. */
export function FigureCards({ report, unit }: { report: Report; unit: LengthUnit }) {
  const cards = figureCards(reportCounts(report), formatLength(report.summary.rmsMm, unit), formatLength(report.summary.maxMm, unit));
  return (
    <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7" data-testid="figure-cards">
      {cards.map(([k, v]) => (
        <div key={k} className="panel !p-3"><dt className="text-sm text-muted">{k}</dt><dd className="font-mono text-2xl font-bold">{v}</dd></div>
      ))}
    </dl>
  );
}
