/**
 * THE wrapper for every server action — the twin of route() in lib/http/route.ts. It refuses a cross-site
 * call, reads the session from next/headers cookies, parses the input (a plain object or FormData; use
 * `z.coerce` for form fields) with zod, checks the permission, and returns a result instead of throwing:
 * `{ ok: true, data }` or `{ ok: false, error: { code, message, fields? } }`. Next's redirect()/notFound()
 * thrown inside pass through.
 *
 * Use:
 *   // app/…/actions.ts
 *   'use server';
 *   export const renameWorkshopAction = action(
 *     { permission: 'workshop:settings', input: z.object({ name: z.string().min(1) }) },
 *     async ({ db, actor, input }) => renameWorkshop(db, actor, input.name),
 *   );
 */
import { headers } from 'next/headers';
import { unstable_rethrow } from 'next/navigation';
import { z } from 'zod';
import { getDb, type Db } from '@/db/client';
import { currentCookieData, resolveAuth, type Auth } from '@/lib/auth/session';
import type { Actor, Permission } from '@/lib/services/actor';
import { fromZodError, toAppError, type ErrorBody } from './errors';
import { assertSameOrigin, clientIp } from './origin';
import { admit, type AuthMode } from './route';

export type ActionResult<R> = { ok: true; data: R } | { ok: false; error: ErrorBody['error'] };

export type ActionContext<A extends AuthMode, I> = {
  db: Db;
  auth: A extends 'none' ? Auth | null : Auth;
  actor: A extends 'actor' ? Actor : Actor | null;
  input: I;
  ip: string | null;
};

function toObject(input: unknown): unknown {
  if (typeof FormData !== 'undefined' && input instanceof FormData) return Object.fromEntries(input.entries());
  return input ?? {};
}

export function action<A extends AuthMode = 'actor', IS extends z.ZodType = z.ZodUndefined, R = unknown>(
  opts: { auth?: A; permission?: Permission; input?: IS },
  fn: (ctx: ActionContext<A, z.output<IS>>) => Promise<R>,
): (input?: z.input<IS> | FormData) => Promise<ActionResult<R>> {
  const mode: AuthMode = opts.auth ?? 'actor';
  return async (raw) => {
    try {
      const h = await headers();
      assertSameOrigin('POST', h);
      const db = await getDb();
      const auth = await resolveAuth(db, await currentCookieData());
      const actor = admit(mode, auth, opts.permission);
      let input: unknown = undefined;
      if (opts.input) {
        const r = opts.input.safeParse(toObject(raw));
        if (!r.success) throw fromZodError(r.error);
        input = r.data;
      }
      const data = await fn({ db, auth, actor, input, ip: clientIp(h) } as ActionContext<A, z.output<IS>>);
      return { ok: true, data };
    } catch (err) {
      unstable_rethrow(err);
      return { ok: false, error: toAppError(err).toBody().error };
    }
  };
}
