/**
 * Shared helpers for the web tests: a fresh migrated SQLite file per test file, wired as the process-wide
 * database (so route handlers, which call getDb(), use it), a random session secret, and small factories
 * that go through the real services (no mocked database).
 */
import { randomBytes } from 'node:crypto';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { closeDb, getDb, migrateDb, type Db } from '@/db/client';
import { insertMembership } from '@/db/queries/memberships';
import { insertUser, toPublicUser } from '@/db/queries/users';
import { hashPassword } from '@/lib/auth/password';
import { SESSION_COOKIE, startSession } from '@/lib/auth/session';
import type { Actor, Role } from '@/lib/services/actor';
import { signUp } from '@/lib/services/auth';

export type WebTestDb = {
  db: Db;
  dir: string;
  /** The photo store's folder (STORAGE_DIR) when asked for with `{ storage: true }`. */
  storeDir: string;
  close: () => Promise<void>;
};

/**
 * Points DATABASE_URL at a new temp file, migrates it and returns the shared handle; with `storage: true` also
 * points STORAGE_DIR at a new folder beside it. `close()` removes both. Call once per file.
 */
export async function useFreshDatabase(opts: { storage?: boolean } = {}): Promise<WebTestDb> {
  const dir = mkdtempSync(join(tmpdir(), 'gridproof-web-'));
  process.env.DATABASE_URL = `file:${join(dir, 'test.db')}`;
  process.env.SESSION_SECRET ??= randomBytes(32).toString('hex');
  const storeDir = join(dir, 'storage');
  if (opts.storage) {
    mkdirSync(storeDir);
    process.env.STORAGE_DIR = storeDir;
  }
  await closeDb();
  const db = await getDb();
  await migrateDb(db);
  return {
    db,
    dir,
    storeDir,
    close: async () => {
      await closeDb();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

let counter = 0;
/** A unique e-mail address for a test. */
export const uniqueEmail = (tag = 'user') => `${tag}.${Date.now().toString(36)}.${counter++}@example.test`;

export const TEST_PASSWORD = 'correct horse battery';

/** Signs up an owner with a new workshop through the service and returns their actor. */
export async function newOwner(db: Db, workshopName = 'Test shop'): Promise<Actor> {
  const { user, workshopId } = await signUp(db, { email: uniqueEmail('owner'), password: TEST_PASSWORD, name: 'Owner', workshopName });
  return { user, workshopId, role: 'owner' };
}

/** Adds a user with `role` to the actor's workshop and returns their actor. */
export async function addMember(db: Db, workshopId: string, role: Role): Promise<Actor> {
  const row = await insertUser(db, { email: uniqueEmail(role), name: `A ${role}`, passwordHash: await hashPassword(TEST_PASSWORD) });
  await insertMembership(db, { workshopId, userId: row.id, role });
  return { user: toPublicUser(row), workshopId, role };
}

/** A Cookie header value that signs `actor` in to their workshop (a real session row). */
export async function sessionCookie(db: Db, actor: Actor): Promise<string> {
  return `${SESSION_COOKIE}=${await startSession(db, { userId: actor.user.id, workshopId: actor.workshopId })}`;
}

type Handler = (req: Request, ctx?: { params: Promise<Record<string, string | string[] | undefined>> }) => Promise<Response>;

/** Calls a route handler the way Next does: a Request (same-origin by default) and its params. */
export async function call(
  handler: Handler,
  opts: { method?: string; path?: string; body?: unknown; cookie?: string | null; headers?: Record<string, string>; params?: Record<string, string> } = {},
): Promise<{ status: number; json: unknown; setCookie: string | null; res: Response }> {
  const method = opts.method ?? (opts.body === undefined ? 'GET' : 'POST');
  const headers: Record<string, string> = { host: 'gridproof.test', ...(opts.headers ?? {}) };
  if (opts.body !== undefined) headers['content-type'] ??= 'application/json';
  if (opts.cookie) headers.cookie = opts.cookie;
  const req = new Request(`http://gridproof.test${opts.path ?? '/api/x'}`, {
    method,
    headers,
    body: opts.body === undefined ? undefined : typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body),
  });
  const res = await handler(req, { params: Promise.resolve(opts.params ?? {}) });
  const text = await res.text();
  return { status: res.status, json: text ? (JSON.parse(text) as unknown) : null, setCookie: res.headers.get('set-cookie'), res };
}

/** The `name=value` part of a Set-Cookie header, to send back as Cookie. */
export function cookieFrom(setCookie: string | null): string {
  if (!setCookie) throw new Error('no Set-Cookie header');
  return setCookie.split(';')[0] ?? '';
}
