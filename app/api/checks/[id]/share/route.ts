import { z } from 'zod';
import { publicBaseUrl } from '@/lib/http/origin';
import { json, route } from '@/lib/http/route';
import { createShareLink, listShareLinks, ShareCreateSchema } from '@/lib/services/share';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/checks/{id}/share → {links} (no tokens: a link's URL is shown only when it is made). */
export const GET = route({ params: Params }, async ({ db, actor, params }) => ({ links: await listShareLinks(db, actor, params.id) }));

/** POST /api/checks/{id}/share {expiresInDays, label?} → 201 {link: {id, url, expiresAt}}. Owner or machinist. */
export const POST = route({ params: Params, body: ShareCreateSchema }, async ({ db, actor, params, body, req }) =>
  json(await createShareLink(db, actor, params.id, body, publicBaseUrl(req)), 201),
);
