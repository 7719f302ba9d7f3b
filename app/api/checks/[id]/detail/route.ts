import { z } from 'zod';
import { route } from '@/lib/http/route';
import { getCheckDetail } from '@/lib/services/check-views';
import { getStorage } from '@/lib/storage';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/checks/{id}/detail → `{ check, pattern, detections, photo, can, units }` for the report and review pages. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => getCheckDetail(db, getStorage(), actor, params.id));
