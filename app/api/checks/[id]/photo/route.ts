import { z } from 'zod';
import { route } from '@/lib/http/route';
import { getStorage } from '@/lib/storage';
import { DISPLAY_SIZES, getDisplayPhoto } from '@/lib/services/check-views';

const Params = z.object({ id: z.string().min(1).max(64) });
const Query = z.object({ size: z.coerce.number().pipe(z.union(DISPLAY_SIZES.map((s) => z.literal(s)) as [z.ZodLiteral<1600>, z.ZodLiteral<3200>])).default(1600) });

/**
 * GET /api/checks/{id}/photo?size=1600|3200 → the photo's display copy (JPEG, upright, no metadata), to
 * members of the check's workshop only; private caching, revalidated by ETag.
 */
export const GET = route({ params: Params, query: Query }, async ({ db, actor, params, query, req }) => {
  const { bytes, etag } = await getDisplayPhoto(db, getStorage(), actor, params.id, query.size);
  const headers = { etag, 'cache-control': 'private, max-age=3600', 'content-type': 'image/jpeg', 'x-content-type-options': 'nosniff' };
  if (req.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(bytes), { status: 200, headers: { ...headers, 'content-length': String(bytes.byteLength) } });
});
