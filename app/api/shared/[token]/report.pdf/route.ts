import { z } from 'zod';
import { route } from '@/lib/http/route';
import { renderReportPdf } from '@/lib/pdf';
import { openSharedReport } from '@/lib/services/share';

const Query = z.object({ paper: z.enum(['a4', 'letter']).default('a4'), units: z.enum(['mm', 'in']).default('mm') });

/** GET /api/shared/{token}/report.pdf → the shared report as PDF (no workshop name, no photo data). */
export const GET = route({ auth: 'none', params: z.object({ token: z.string().max(200) }), query: Query }, async ({ db, params, query }) => {
  const v = await openSharedReport(db, params.token);
  const bytes = await renderReportPdf(v.report, {
    paper: query.paper, units: query.units, workshopName: 'Shared report', bedName: v.bedName, checkTitle: v.checkTitle, checkedAt: v.checkedAt, photoNote: v.photoNote, fits: v.fits,
    comments: v.comments.map((c) => ({ author: c.authorName, positionLabel: c.positionLabel, body: c.body, createdAt: c.createdAt })),
  });
  return new Response(Buffer.from(bytes), { headers: { 'content-type': 'application/pdf', 'content-disposition': 'attachment; filename="gridproof-shared-report.pdf"', 'cache-control': 'no-store', 'referrer-policy': 'no-referrer' } });
});
