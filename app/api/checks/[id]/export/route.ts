import { z } from 'zod';
import { route } from '@/lib/http/route';
import { EXPORT_FORMATS, exportCheck } from '@/lib/services/check-views';

const Params = z.object({ id: z.string().min(1).max(64) });
const Query = z.object({ format: z.enum(EXPORT_FORMATS).default('csv'), units: z.enum(['mm', 'in']).optional() });

/**
 * GET /api/checks/{id}/export?format=csv|panels-csv|json&units=mm|in → the report as a download: its positions
 * (`csv`) or its panels (`panels-csv`) as CSV, lengths in `units` (default: the user's choice), or the measurement
 * core's report as is (`json`, mm).
 */
export const GET = route({ params: Params, query: Query }, async ({ db, actor, params, query }) => {
  const out = await exportCheck(db, actor, params.id, query.format, query.units ?? actor.user.units);
  return new Response(out.body, {
    status: 200,
    headers: { 'content-type': out.contentType, 'content-disposition': `attachment; filename="${out.fileName}"`, 'cache-control': 'no-store' },
  });
});
