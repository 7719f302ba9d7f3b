import { z } from 'zod';
import { route } from '@/lib/http/route';
import { getCheckReportJson } from '@/lib/checks/api';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/checks/{id}/report → the report JSON of the measurement core's contract; 409 until done. */
export const GET = route({ params: Params }, async ({ db, actor, params }) =>
  new Response(await getCheckReportJson(db, actor, params.id), { headers: { 'content-type': 'application/json', 'cache-control': 'private, no-store' } }));
