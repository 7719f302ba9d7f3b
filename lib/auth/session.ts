/**
 * Sessions: an iron-session 8 sealed cookie (`gp_session`; httpOnly, SameSite=Lax, Path=/, Secure when the
 * request came over HTTPS, `COOKIE_SECURE=1|0` to force it either way) that names a server-side `sessions` row and the workshop the user is
 * acting in. Sign-out and password changes revoke the row, so a stolen cookie dies with it. The role is read
 * from `memberships` on every request, so a role change applies at once.
 *
 * Use (you rarely need this directly):
 * - Route handlers: `route()` in lib/http/route.ts reads the session from the request and hands you the
 *   `actor`; to sign in, return `withSessionCookie(response, await startSession(...))`.
 * - Server components: `await currentAuth()` (null when signed out) or `await requireActor()` (redirects
 *   to /sign-in).
 * - Server actions: `action()` in lib/http/action.ts.
 */
import 'server-only';
import { sealData, unsealData } from 'iron-session';
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import { getDb, type Db } from '@/db/client';
import { getLiveSessionAuth, insertSession, revokeSession, touchSession } from '@/db/queries/sessions';
import { loadSessionSecret } from '@/lib/auth/secret';
import { requestIsHttps } from '@/lib/http/origin';
import type { Actor, ActorUser } from '@/lib/services/actor';

export const SESSION_COOKIE = 'gp_session';
/** How long a session lives without signing in again: 30 days, in ms. */
export const SESSION_TTL_MS = 30 * 24 * 3600 * 1000;
/** lastSeenAt is written at most this often, ms. */
const TOUCH_EVERY_MS = 5 * 60 * 1000;

const CookieDataSchema = z.object({ sid: z.string().min(1), wid: z.string().min(1).optional() });
export type SessionCookieData = z.infer<typeof CookieDataSchema>;

/** What a request knows about its user. `actor` is null when the user belongs to no workshop. */
export type Auth = { sessionId: string; user: ActorUser; actor: Actor | null; workshops: { workshopId: string; name: string; role: Actor['role'] }[] };

/**
 * Whether the session cookie carries Secure: COOKIE_SECURE=1 or 0 decides; otherwise it follows the request's
 * real scheme (`requestIsHttps`), so the same server keeps a session over https://… and over a shop LAN's
 * plain http://192.168.x.y:3000 (a browser drops a Secure cookie set over plain HTTP, except on localhost).
 */
export function cookieIsSecure(req: { headers: Headers; url?: string }, env: NodeJS.ProcessEnv = process.env): boolean {
  if (env.COOKIE_SECURE === '0' || env.COOKIE_SECURE === 'false') return false;
  if (env.COOKIE_SECURE === '1' || env.COOKIE_SECURE === 'true') return true;
  return requestIsHttps(req.headers, req.url);
}

export function sessionCookieOptions(secure: boolean) {
  return { httpOnly: true, sameSite: 'lax' as const, secure, path: '/', maxAge: Math.floor(SESSION_TTL_MS / 1000) - 60 };
}

export async function sealSession(data: SessionCookieData): Promise<string> {
  return sealData(data, { password: loadSessionSecret(), ttl: Math.floor(SESSION_TTL_MS / 1000) });
}

// Unsealing costs about a millisecond of crypto per request; the same sealed value always opens to the same
// data, so it is remembered for a minute (bounded). Revocation is unaffected: resolveAuth still reads the
// sessions row on every request.
const unsealed = new Map<string, { data: SessionCookieData | null; until: number }>();
const UNSEAL_CACHE_MS = 60_000;

export async function unsealSession(value: string | undefined | null): Promise<SessionCookieData | null> {
  if (!value) return null;
  const now = Date.now();
  const hit = unsealed.get(value);
  if (hit && hit.until > now) return hit.data;
  let data: SessionCookieData | null;
  try {
    const raw = await unsealData<unknown>(value, { password: loadSessionSecret(), ttl: Math.floor(SESSION_TTL_MS / 1000) });
    const parsed = CookieDataSchema.safeParse(raw);
    data = parsed.success ? parsed.data : null;
  } catch {
    data = null;
  }
  if (data) {
    if (unsealed.size >= 2000) unsealed.clear();
    unsealed.set(value, { data, until: now + UNSEAL_CACHE_MS });
  }
  return data;
}

/**
 * Reads one cookie from a Cookie header. A value that is not valid percent-encoding (`%E0%A4%A`) is kept as
 * sent: it then fails to unseal like any other foreign value, and the request is simply signed out.
 */
export function readCookie(header: string | null, name: string): string | undefined {
  if (!header) return undefined;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    if (part.slice(0, eq).trim() !== name) continue;
    const raw = part.slice(eq + 1).trim();
    try {
      return decodeURIComponent(raw);
    } catch {
      return raw;
    }
  }
  return undefined;
}

/** A Set-Cookie header value for the session (`value` null clears it), Secure as `cookieIsSecure` decides. */
export function sessionSetCookie(value: string | null, secure: boolean): string {
  const o = sessionCookieOptions(secure);
  const parts = [`${SESSION_COOKIE}=${value ?? ''}`, `Path=${o.path}`, 'HttpOnly', 'SameSite=Lax', `Max-Age=${value ? o.maxAge : 0}`];
  if (o.secure) parts.push('Secure');
  return parts.join('; ');
}

/** Adds the session cookie (or its removal) to the response to `req` and returns it. */
export function withSessionCookie(res: Response, sealed: string | null, req: Request): Response {
  res.headers.append('set-cookie', sessionSetCookie(sealed, cookieIsSecure(req)));
  return res;
}

/** Creates a sessions row and returns the sealed cookie value naming it and the workshop. */
export async function startSession(
  db: Db,
  input: { userId: string; workshopId?: string | null; ip?: string | null; userAgent?: string | null },
): Promise<string> {
  const row = await insertSession(db, { userId: input.userId, expiresAt: Date.now() + SESSION_TTL_MS, ip: input.ip, userAgent: input.userAgent });
  return sealSession({ sid: row.id, ...(input.workshopId ? { wid: input.workshopId } : {}) });
}

/** Resolves a cookie's data to the live session, its user and their actor in the chosen workshop. */
export async function resolveAuth(db: Db, data: SessionCookieData | null): Promise<Auth | null> {
  if (!data) return null;
  const now = Date.now();
  const live = await getLiveSessionAuth(db, data.sid, now);
  if (!live) return null;
  const { session, user, workshops } = live;
  if (!session.lastSeenAt || now - session.lastSeenAt > TOUCH_EVERY_MS) await touchSession(db, session.id, now);
  // the chosen workshop's membership is one of the rows just read: the role is as fresh as this request
  const chosen = (data.wid ? workshops.find((w) => w.workshopId === data.wid) : undefined) ?? workshops[0];
  const actor: Actor | null = chosen ? { user, workshopId: chosen.workshopId, role: chosen.role } : null;
  return { sessionId: session.id, user, actor, workshops };
}

/** Auth of a route handler's request (cookie header). */
export async function authFromRequest(db: Db, req: Request): Promise<Auth | null> {
  return resolveAuth(db, await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE)));
}

/** Revokes the session named by the cookie data, if any. */
export async function endSession(db: Db, data: SessionCookieData | null): Promise<void> {
  if (data) await revokeSession(db, data.sid);
}

/** Auth of the current server component / server action (next/headers cookies). */
export async function currentAuth(): Promise<Auth | null> {
  const jar = await cookies();
  return resolveAuth(await getDb(), await unsealSession(jar.get(SESSION_COOKIE)?.value));
}

/** The current actor, or a redirect to /sign-in (server components). */
export async function requireActor(): Promise<{ actor: Actor; auth: Auth }> {
  const auth = await currentAuth();
  if (!auth) redirect('/sign-in');
  if (!auth.actor) redirect('/no-workshop');
  return { actor: auth.actor, auth };
}

/** Cookie data of the current server action / component, for sign-out or switching workshop. */
export async function currentCookieData(): Promise<SessionCookieData | null> {
  const jar = await cookies();
  return unsealSession(jar.get(SESSION_COOKIE)?.value);
}

/** Writes (or clears, with null) the session cookie from a server action. */
export async function setSessionCookieInAction(sealed: string | null): Promise<void> {
  const jar = await cookies();
  const options = sessionCookieOptions(cookieIsSecure({ headers: await headers() }));
  if (sealed) jar.set(SESSION_COOKIE, sealed, options);
  else jar.set(SESSION_COOKIE, '', { ...options, maxAge: 0 });
}
