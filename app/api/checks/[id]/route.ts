import { z } from 'zod';
import { route } from '@/lib/http/route';
import { getCheckStatus } from '@/lib/checks/api';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/checks/{id} → `{ check: { id, status, stage, progress, error? } }` (poll while queued or running). */
export const GET = route({ params: Params }, async ({ db, actor, params }) => ({ check: await getCheckStatus(db, actor, params.id) }));
