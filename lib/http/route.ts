/**
 * THE wrapper for every route handler under app/api/. It reads the session, refuses cross-site changing
 * requests, parses and validates the body (JSON, or a form with `z.coerce` fields), the query string and the
 * path params with zod, checks the permission, runs your handler and maps every error to the one JSON
 * shape `{ "error": { "code", "message", "fields"? } }` (lib/http/errors.ts).
 *
 * Use:
 *   // app/api/beds/[id]/route.ts
 *   export const PATCH = route(
 *     { permission: 'bed:write', params: z.object({ id: z.string() }), body: BedPatchSchema },
 *     async ({ db, actor, params, body }) => ({ bed: await updateBed(db, actor, params.id, body) }),
 *   );
 *
 * Options: `auth` — 'actor' (default: signed in and a member of a workshop, else 401), 'user' (signed in,
 * workshop optional), 'none' (public; `auth` may be null). `permission` — checked with authorize() before
 * the handler (services check again). Return a plain value for 200 JSON, `json(value, 201)` for another
 * status, or any Response. Answers carry `Cache-Control: no-store`.
 */
import { z } from 'zod';
import { getDb, type Db } from '@/db/client';
import { authFromRequest, type Auth } from '@/lib/auth/session';
import { authorize, type Actor, type Permission } from '@/lib/services/actor';
import { AppError, errorResponse, fromZodError, toAppError, unauthenticated } from './errors';
import { assertSameOrigin, clientIp } from './origin';

export type AuthMode = 'actor' | 'user' | 'none';

/** Largest JSON or form body a handler accepts, bytes (uploads parse their own bodies). */
export const MAX_BODY_BYTES = 1_000_000;

export type RouteContext<A extends AuthMode, B, Q, P> = {
  req: Request;
  db: Db;
  auth: A extends 'none' ? Auth | null : Auth;
  actor: A extends 'actor' ? Actor : Actor | null;
  body: B;
  query: Q;
  params: P;
  ip: string | null;
};

type NextCtx = { params: Promise<Record<string, string | string[] | undefined>> };
export type RouteHandler = (req: Request, ctx?: NextCtx) => Promise<Response>;

/** A JSON response with a status (default 200). */
export function json(value: unknown, status = 200, headers?: HeadersInit): Response {
  const res = Response.json(value, { status, headers });
  res.headers.set('cache-control', 'no-store');
  return res;
}

/** Reads a request body as an object: JSON, or a urlencoded / multipart form (files kept as File). */
export async function readBody(req: Request): Promise<unknown> {
  const length = Number(req.headers.get('content-length') ?? '0');
  if (length > MAX_BODY_BYTES) throw new AppError('too_large', 413, `The body is larger than ${MAX_BODY_BYTES} bytes.`);
  const type = (req.headers.get('content-type') ?? '').toLowerCase();
  if (type.includes('application/x-www-form-urlencoded') || type.includes('multipart/form-data')) {
    let form: FormData;
    try {
      form = await req.formData();
    } catch {
      throw new AppError('invalid_form', 400, 'The body is not a valid form (its content type says form data).');
    }
    return Object.fromEntries(form.entries());
  }
  const text = await req.text();
  if (text.length > MAX_BODY_BYTES) throw new AppError('too_large', 413, `The body is larger than ${MAX_BODY_BYTES} bytes.`);
  if (text.trim() === '') return {};
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new AppError('invalid_json', 400, 'The body is not valid JSON.');
  }
}

function parseWith<S extends z.ZodType>(schema: S, value: unknown, what: string): z.output<S> {
  const r = schema.safeParse(value);
  if (!r.success) throw fromZodError(r.error, `The ${what} has problems.`);
  return r.data;
}

/**
 * The access rules both wrappers (this one and action()) apply once the session is read: 401 without a
 * session unless the mode is 'none', 403 `no_workshop` for 'actor' mode without a workshop, then the
 * permission. Returns the actor (null when there is none and none is needed).
 */
export function admit(mode: AuthMode, auth: Auth | null, permission?: Permission): Actor | null {
  if (mode !== 'none' && !auth) throw unauthenticated();
  if (mode === 'actor' && !auth?.actor) throw new AppError('no_workshop', 403, 'You are not a member of any workshop.');
  const actor = auth?.actor ?? null;
  if (permission) {
    if (!actor) throw unauthenticated();
    authorize(actor, permission);
  }
  return actor;
}

export function route<
  A extends AuthMode = 'actor',
  BS extends z.ZodType = z.ZodUndefined,
  QS extends z.ZodType = z.ZodUndefined,
  PS extends z.ZodType = z.ZodUndefined,
>(
  opts: { auth?: A; permission?: Permission; body?: BS; query?: QS; params?: PS },
  handler: (ctx: RouteContext<A, z.output<BS>, z.output<QS>, z.output<PS>>) => Promise<unknown>,
): RouteHandler {
  const mode: AuthMode = opts.auth ?? 'actor';
  return async (req, nextCtx) => {
    try {
      assertSameOrigin(req.method, req.headers, req.url);
      const db = await getDb();
      const auth = mode === 'none' ? await authFromRequest(db, req).catch(() => null) : await authFromRequest(db, req);
      const actor = admit(mode, auth, opts.permission);
      const rawParams = nextCtx?.params ? await nextCtx.params : {};
      const params = opts.params ? parseWith(opts.params, rawParams, 'address') : undefined;
      const query = opts.query ? parseWith(opts.query, Object.fromEntries(new URL(req.url).searchParams), 'query') : undefined;
      const body = opts.body ? parseWith(opts.body, await readBody(req), 'request body') : undefined;
      const out = await handler({ req, db, auth, actor, body, query, params, ip: clientIp(req.headers) } as RouteContext<A, z.output<BS>, z.output<QS>, z.output<PS>>);
      if (out instanceof Response) {
        if (!out.headers.has('cache-control')) out.headers.set('cache-control', 'no-store');
        return out;
      }
      return json(out ?? { ok: true });
    } catch (err) {
      const e = toAppError(err);
      return errorResponse(e, { 'cache-control': 'no-store' });
    }
  };
}
