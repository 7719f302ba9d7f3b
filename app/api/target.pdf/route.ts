import { route } from '@/lib/http/route';
import { renderTargetPdf, targetPdfFilename, TargetPdfQuerySchema } from '@/lib/pdf';

const Query = TargetPdfQuerySchema;

/** GET /api/target.pdf?size=100mm|150mm|4in&paper=a4|letter or size=250mm&paper=a3|tabloid → the printable reference target (public). */
export const GET = route({ auth: 'none', query: Query }, async ({ query }) => {
  const bytes = await renderTargetPdf(query);
  return new Response(Buffer.from(bytes), {
    headers: { 'content-type': 'application/pdf', 'content-disposition': `inline; filename="${targetPdfFilename(query)}"`, 'cache-control': 'public, max-age=86400' },
  });
});
