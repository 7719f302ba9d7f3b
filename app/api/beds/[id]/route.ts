import { z } from 'zod';
import { route } from '@/lib/http/route';
import { BedPatchSchema, deleteBed, getBed, updateBed } from '@/lib/services/beds';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/beds/{id} → {bed, pattern, checks, revisions}; 404 when it is not this workshop's. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => {
  const { bed, patternJson, checks, revisions } = await getBed(db, actor, params.id);
  return { bed, pattern: patternJson, checks, revisions };
});

/** PATCH /api/beds/{id} {name?, notes?, pattern? | preset?} → {bed}; a new pattern is saved as a new revision. */
export const PATCH = route({ params: Params, body: BedPatchSchema }, async ({ db, actor, params, body }) => ({ bed: await updateBed(db, actor, params.id, body) }));

/** DELETE /api/beds/{id} → {ok: true}. Owner only. */
export const DELETE = route({ params: Params }, async ({ db, actor, params }) => {
  await deleteBed(db, actor, params.id);
  return { ok: true };
});
