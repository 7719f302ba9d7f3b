import { z } from 'zod';
import { json, route } from '@/lib/http/route';
import { listChecks, uploadCheck } from '@/lib/checks/api';
import { getStorage } from '@/lib/storage';

const Params = z.object({ id: z.string().min(1).max(64) });

/**
 * POST /api/beds/{id}/checks — multipart: `photo` (file), `referenceMm`, optional `corners` (JSON of four
 * [x, y] px pairs), `title` and `distances` (JSON `[{ "from": "insert A1", "to": "insert R12", "mm": 1700.4,
 * "sigmaMm": 0.3 }]`: measured distances between positions, labels as the report writes them) → 202 `{ check: { id, status }, photo: { id, duplicate }, reused }`.
 */
export const POST = route({ params: Params, permission: 'photo:upload' }, async ({ db, actor, params, req }) =>
  json(await uploadCheck(db, getStorage(), actor, params.id, req), 202));

/** GET /api/beds/{id}/checks → `{ checks: [...] }`, newest first. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => ({ checks: await listChecks(db, actor, params.id) }));
