import { json, route } from '@/lib/http/route';
import { BedCreateSchema, createBed, listBeds } from '@/lib/services/beds';

/** GET /api/beds → {beds: [...]}, each with its pattern summary and its last check. */
export const GET = route({ permission: 'workshop:read' }, async ({ db, actor }) => ({ beds: await listBeds(db, actor) }));

/** POST /api/beds {name, pattern} or {name, preset} (or pattern: {preset}) → 201 {bed}. Owner or machinist. */
export const POST = route({ permission: 'bed:write', body: BedCreateSchema }, async ({ db, actor, body }) => json({ bed: await createBed(db, actor, body) }, 201));
