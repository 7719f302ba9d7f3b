import { z } from 'zod';
import { route } from '@/lib/http/route';
import { compareChecks } from '@/lib/checks/api';

const Params = z.object({ id: z.string().min(1).max(64), other: z.string().min(1).max(64) });

/** GET /api/checks/{a}/compare/{b} → `{ before, after, comparison }`: changes from check a to check b. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => compareChecks(db, actor, params.id, params.other));
