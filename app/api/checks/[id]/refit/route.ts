import { z } from 'zod';
import { json, route } from '@/lib/http/route';
import { refitCheck, RefitBodySchema } from '@/lib/checks/api';

const Params = z.object({ id: z.string().min(1).max(64) });

/** POST /api/checks/{id}/refit `{ detections, edits? }` → 202 `{ check: { id, status } }`: re-fit after review. */
export const POST = route({ params: Params, permission: 'check:review', body: RefitBodySchema }, async ({ db, actor, params, body }) =>
  json(await refitCheck(db, actor, params.id, body), 202));
