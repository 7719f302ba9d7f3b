/**
 * One call for the "send this report to a helper" use case: draws the deviation map of the report as PNG and
 * fills the report template with the report's own verdict and sentence.
 */
import type { Report } from '@/lib/geometry/contract';
import { renderDeviationMapPng } from './map-image';
import { reportMail, type MailContent, type ReportMailInput } from './templates';

export type ReportMailFromReportInput = Omit<ReportMailInput, 'verdict' | 'verdictSentence' | 'map'> & {
  report: Report;
  /** Width of the inline map, px (default 640). */
  mapWidthPx?: number;
};

/** The report mail for `report`, its deviation map inline as PNG. */
export async function reportMailFromReport(input: ReportMailFromReportInput): Promise<MailContent> {
  const { report, mapWidthPx, ...rest } = input;
  const png = await renderDeviationMapPng(report, { widthPx: mapWidthPx ?? 640 });
  return reportMail({ ...rest, verdict: report.summary.verdict, verdictSentence: report.summary.sentence, shapeSentence: report.summary.shapeSentence, map: { content: png, contentType: 'image/png' } });
}
