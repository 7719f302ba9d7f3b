/**
 * One call for the "send this report to a helper" use case: draws the deviation map of the report as PNG and
 * fills the report template with the report's own verdict word and mark, headline, figures and measured distances,
 * in the sender's unit (lib/report: the same words, marks, arrow scale and method note as the report page, the PDF
 * and the shared page).
 */
import type { Report } from '@/lib/geometry/contract';
import { distanceSentence } from '@/lib/report/distances';
import { headline, shapeLine } from '@/lib/report/headline';
import { methodNote, methodNoteLines, type FitFamily } from '@/lib/report/method-note';
import { formatLength, type LengthUnit } from '@/lib/report/units';
import { BED_VERDICT_MARK, figureCards, reportCounts } from '@/lib/report/words';
import { renderDeviationMapPng, renderMarkPng } from './map-image';
import { reportMail, type MailContent, type ReportMailInput } from './templates';

export type ReportMailFromReportInput = Omit<ReportMailInput, 'verdict' | 'verdictSentence' | 'shapeSentence' | 'figures' | 'verdictMark' | 'map' | 'methodNote' | 'distances'> & {
  report: Report;
  /** The unit lengths are written in (default mm). */
  units?: LengthUnit;
  /**
   * The pattern's families for the method note; null when the pattern is gone. Absent: the note says only how the
   * fit tables were checked and how the bands are drawn.
   */
  fits?: FitFamily[] | null;
  /** Width of the inline map, px (default 640). */
  mapWidthPx?: number;
};

/** The report mail for `report`, its deviation map inline as PNG. */
export async function reportMailFromReport(input: ReportMailFromReportInput): Promise<MailContent> {
  const { report, mapWidthPx, units, fits, ...rest } = input;
  const unit = units ?? 'mm';
  const s = report.summary;
  const [png, mark] = await Promise.all([renderDeviationMapPng(report, { widthPx: mapWidthPx ?? 640 }), renderMarkPng(BED_VERDICT_MARK[s.verdict])]);
  const figures = figureCards(reportCounts(report), formatLength(s.rmsMm, unit), formatLength(s.maxMm, unit)).map(([k, v]) => `${k} ${v}`).join(' · ');
  const method = methodNote(fits ?? null, unit);
  return reportMail({
    ...rest, distances: (report.distances ?? []).map((d) => distanceSentence(d, (mm) => formatLength(mm, unit))), methodNote: { heading: method.heading, lines: fits === undefined ? [method.note] : methodNoteLines(method) }, verdict: s.verdict, verdictSentence: headline(report, unit), shapeSentence: shapeLine(report, unit), figures, verdictMark: mark,
    map: { content: png, contentType: 'image/png' },
  });
}
