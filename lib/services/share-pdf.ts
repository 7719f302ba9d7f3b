/** The report of a check as PDF for its members (comments included), through lib/pdf's renderReportPdf. */
import type { Db } from '@/db/client';
import { listComments } from '@/db/queries/comments';
import { getWorkshop } from '@/db/queries/workshops';
import { renderReportPdf } from '@/lib/pdf';
import { authorize, type Actor } from './actor';
import { loadFinishedCheck, loadFitFamilies } from './share-report';
import { formatUtcDay } from '@/lib/dates';

export async function checkReportPdf(db: Db, actor: Actor, checkId: string, opts: { paper: 'a4' | 'letter'; units: 'mm' | 'in' }): Promise<{ bytes: Uint8Array; fileName: string }> {
  authorize(actor, 'workshop:read');
  const { check, report, bedName } = await loadFinishedCheck(db, actor.workshopId, checkId);
  const [workshop, comments, fits] = await Promise.all([getWorkshop(db, actor.workshopId), listComments(db, actor.workshopId, checkId), loadFitFamilies(db, check)]);
  const bytes = await renderReportPdf(report, {
    paper: opts.paper, units: opts.units, workshopName: workshop?.name ?? 'Workshop', bedName, checkTitle: check.title, checkedAt: check.finishedAt ?? check.createdAt, fits,
    comments: comments.map((c) => ({ author: c.authorName, positionLabel: c.positionLabel, body: c.body, createdAt: c.createdAt })),
  });
  const slug = bedName.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'bed';
  const day = formatUtcDay(check.finishedAt ?? check.createdAt);
  return { bytes, fileName: `gridproof-${slug}-${day}.pdf` };
}
