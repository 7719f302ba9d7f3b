import { json, route } from '@/lib/http/route';
import { AccessoryCreateSchema, createAccessory, listAccessories, listAccessoryPresets } from '@/lib/services/accessories';

/** GET /api/accessories → {accessories, presets}. */
export const GET = route({}, async ({ db, actor }) => ({ accessories: await listAccessories(db, actor), presets: listAccessoryPresets() }));

/** POST /api/accessories {name, preset, params} | {name, spec} → 201 {accessory}. Owner or machinist. */
export const POST = route({ permission: 'accessory:write', body: AccessoryCreateSchema }, async ({ db, actor, body }) =>
  json({ accessory: await createAccessory(db, actor, body) }, 201),
);
