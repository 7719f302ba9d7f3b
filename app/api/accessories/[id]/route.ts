import { z } from 'zod';
import { route } from '@/lib/http/route';
import { AccessoryPatchSchema, deleteAccessory, getAccessory, updateAccessory } from '@/lib/services/accessories';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/accessories/{id} → {accessory}. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => ({ accessory: await getAccessory(db, actor, params.id) }));

/** PATCH /api/accessories/{id} {name?, spec?} → {accessory}. Owner or machinist. */
export const PATCH = route({ params: Params, body: AccessoryPatchSchema }, async ({ db, actor, params, body }) => ({ accessory: await updateAccessory(db, actor, params.id, body) }));

/** DELETE /api/accessories/{id} → {ok: true}. Owner or machinist. */
export const DELETE = route({ params: Params }, async ({ db, actor, params }) => {
  await deleteAccessory(db, actor, params.id);
  return { ok: true };
});
