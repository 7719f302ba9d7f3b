import { z } from 'zod';
import { route } from '@/lib/http/route';
import { checkReportPdf } from '@/lib/services/share-pdf';

const Query = z.object({ paper: z.enum(['a4', 'letter']).default('a4'), units: z.enum(['mm', 'in']).optional() });

/** GET /api/checks/{id}/report.pdf?paper=a4|letter&units=mm|in → the report as PDF, with its comments. */
export const GET = route({ params: z.object({ id: z.string().min(1).max(64) }), query: Query }, async ({ db, actor, params, query }) => {
  const { bytes, fileName } = await checkReportPdf(db, actor, params.id, { paper: query.paper, units: query.units ?? actor.user.units });
  return new Response(Buffer.from(bytes), { headers: { 'content-type': 'application/pdf', 'content-disposition': `attachment; filename="${fileName}"`, 'cache-control': 'no-store' } });
});
