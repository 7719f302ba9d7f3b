/**
 * The top of a shared report: bed, check, when, the verdict word and its sentence. Pure (no state, no
 * browser API), so the shared page renders it on the server: it is there at first paint, with or without
 * JavaScript, while the map and tables load. Times in UTC so server and browser write the same text.
 */
import { VERDICT_BOX, VERDICT_WORD } from '@/components/Verdict';
import type { Report } from '@/lib/geometry/contract';

export interface SharedVerdictProps {
  bedName: string;
  checkTitle: string | null;
  /** When the check finished, ms since the epoch. */
  checkedAt: number | null;
  summary: Pick<Report['summary'], 'verdict' | 'sentence' | 'shapeSentence'>;
}

export function SharedVerdict({ bedName, checkTitle, checkedAt, summary }: SharedVerdictProps) {
  const when = checkedAt ? `${new Date(checkedAt).toISOString().slice(0, 16).replace('T', ' ')} UTC` : null;
  return (
    <section className={`rounded-xl border-4 p-5 ${VERDICT_BOX[summary.verdict]}`} aria-label="Verdict">
      <p className="text-sm font-bold uppercase tracking-wide">{bedName}{checkTitle ? ` · ${checkTitle}` : ''}{when ? ` · ${when}` : ''}</p>
      <h1 className="mt-1 text-3xl font-bold">{VERDICT_WORD[summary.verdict]}</h1>
      <p className="mt-2 text-xl font-bold leading-snug text-ink" data-testid="verdict-sentence">{summary.sentence}</p>
      {summary.shapeSentence && <p className="mt-1 leading-snug text-ink" data-testid="shape-sentence">{summary.shapeSentence}</p>}
    </section>
  );
}
