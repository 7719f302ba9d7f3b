import { route } from '@/lib/http/route';
import { renderTargetPdf, targetPdfFilename, TargetPdfOptionsSchema } from '@/lib/pdf';

const Query = TargetPdfOptionsSchema.partial().transform((q) => ({ size: q.size ?? '150mm', paper: q.paper ?? 'a4' }));

/** GET /api/target.pdf?size=100mm|150mm|4in&paper=a4|letter → the printable reference target (public). */
export const GET = route({ auth: 'none', query: Query }, async ({ query }) => {
  const bytes = await renderTargetPdf(query);
  return new Response(Buffer.from(bytes), {
    headers: { 'content-type': 'application/pdf', 'content-disposition': `inline; filename="${targetPdfFilename(query)}"`, 'cache-control': 'public, max-age=86400' },
  });
});
