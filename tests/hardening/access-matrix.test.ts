/**
 * The authorisation matrix: every route handler found under app/api/** × owner, machinist, reviewer, a member
 * of another workshop, an anonymous caller and a share-link holder → allowed or refused as designed. The list
 * of handlers is built by scanning the folder, so a new route (or a new method on one) without an entry here
 * fails the first test. Server actions ('use server' files) are scanned the same way.
 *
 * The design is the role table of lib/services/actor.ts (owner ⊃ machinist ⊃ reviewer) plus the house rule
 * that another workshop's record is "not found" (404, never 403) and that signing in is needed (401) for
 * anything that is not public. An answer counts as "allowed" when the request got past the access checks:
 * any status but 401 `unauthenticated`, 403 and 404 (a 409 "not ready" or 422 is the handler's own business).
 */
import { readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { intakePhoto } from '@/lib/checks/intake';
import type { Pattern } from '@/lib/geometry/contract';
import { createAccessory } from '@/lib/services/accessories';
import type { Actor } from '@/lib/services/actor';
import { addComment } from '@/lib/services/comments';
import { inviteMember } from '@/lib/services/members';
import { createShareLink } from '@/lib/services/share';
import { getStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { coreReport, finishedCheck } from '@/tests/services/share-fixtures';
import { insertMembership } from '@/db/queries/memberships';
import { insertUser } from '@/db/queries/users';
import { hashPassword } from '@/lib/auth/password';
import { addMember, newOwner, uniqueEmail, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

const ROOT = process.cwd();
const API = join(ROOT, 'app', 'api');
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
type Method = (typeof METHODS)[number];
type Who = 'owner' | 'machinist' | 'reviewer' | 'other' | 'anon' | 'share';
const WHO: Who[] = ['owner', 'machinist', 'reviewer', 'other', 'anon', 'share'];
/** A allowed · F 403 · N 404 · U 401 unauthenticated. */
type Outcome = 'A' | 'F' | 'N' | 'U';

/** Per-call fixtures: fresh records in the owner's workshop, so a DELETE by one caller leaves the next its own. */
interface Ctx { fresh: () => Promise<Fresh>; shared: Fresh }
interface Fresh { bedId: string; checkId: string; otherCheckId: string; photoCheckId: string; commentId: string; accessoryId: string; invitationId: string; memberId: string; shareLinkId: string; shareToken: string }

type Entry = {
  /** Outcomes for owner, machinist, reviewer, other workshop, anonymous, share-link holder ('P' = public: same answer for all, never 401/403). */
  expect: string;
  params?: (f: Fresh) => Record<string, string>;
  query?: string;
  body?: (f: Fresh) => unknown;
  multipart?: boolean;
};

const check = (f: Fresh) => ({ id: f.checkId });
const MEMBERS_READ = 'AAANUU';
const MACHINIST_UP = 'AAFNUU';
const OWNER_ONLY = 'AFFNUU';

/** The matrix. Keys: `METHOD path` with the folder's [segments]. */
const MATRIX: Record<string, Entry | 'P'> = {
  'GET /api/accessories': { expect: 'AAAAUU' }, // each caller sees their own workshop's library
  'POST /api/accessories': { expect: 'AAFAUU', body: () => ({ name: 'Fence', preset: 'fence-two-bolt', params: {} }) },
  'GET /api/accessories/[id]': { expect: MEMBERS_READ, params: (f) => ({ id: f.accessoryId }) },
  'PATCH /api/accessories/[id]': { expect: MACHINIST_UP, params: (f) => ({ id: f.accessoryId }), body: () => ({ name: 'Renamed fence' }) },
  'DELETE /api/accessories/[id]': { expect: MACHINIST_UP, params: (f) => ({ id: f.accessoryId }) },
  'POST /api/auth/password-reset': { expect: 'P', body: () => ({ email: uniqueEmail('reset') }) },
  'POST /api/auth/password-reset/confirm': { expect: 'P', body: () => ({ token: 'A'.repeat(43), password: 'a fresh long passphrase' }) },
  'POST /api/auth/sign-in': { expect: 'P', body: () => ({ email: uniqueEmail('nobody'), password: 'not a real password' }) },
  'POST /api/auth/sign-out': { expect: 'P' },
  'POST /api/auth/sign-up': { expect: 'P', body: () => ({ email: uniqueEmail('new'), password: 'a fresh long passphrase', name: 'New', workshopName: 'New shop' }) },
  'POST /api/auth/workshop': { expect: 'AAANUU', body: () => ({ workshopId: ownerActor.workshopId }) },
  'GET /api/beds': { expect: 'AAAAUU' },
  'POST /api/beds': { expect: 'AAFAUU', body: () => ({ name: 'New bed', pattern: SMALL_PATTERN }) },
  'GET /api/beds/[id]': { expect: MEMBERS_READ, params: (f) => ({ id: f.bedId }) },
  'PATCH /api/beds/[id]': { expect: MACHINIST_UP, params: (f) => ({ id: f.bedId }), body: () => ({ name: 'Renamed bed' }) },
  'DELETE /api/beds/[id]': { expect: OWNER_ONLY, params: (f) => ({ id: f.bedId }) },
  'GET /api/beds/[id]/checks': { expect: MEMBERS_READ, params: (f) => ({ id: f.bedId }) },
  'POST /api/beds/[id]/checks': { expect: 'AAFNUU', params: (f) => ({ id: f.bedId }), multipart: true },
  'GET /api/checks/[id]': { expect: MEMBERS_READ, params: check },
  'GET /api/checks/[id]/comments': { expect: MEMBERS_READ, params: check },
  'POST /api/checks/[id]/comments': { expect: MEMBERS_READ, params: check, body: () => ({ body: 'Looks square to me.' }) },
  'DELETE /api/checks/[id]/comments/[commentId]': { expect: 'AAFNUU', params: (f) => ({ id: f.checkId, commentId: f.commentId }) }, // author (machinist) or owner
  'GET /api/checks/[id]/compare/[other]': { expect: MEMBERS_READ, params: (f) => ({ id: f.checkId, other: f.otherCheckId }) },
  'GET /api/checks/[id]/detail': { expect: MEMBERS_READ, params: check },
  'GET /api/checks/[id]/export': { expect: MEMBERS_READ, params: check, query: '?format=csv' },
  'POST /api/checks/[id]/fit': { expect: MEMBERS_READ, params: check, body: (f) => ({ mode: 'map', accessoryId: f.accessoryId }) },
  'GET /api/checks/[id]/photo': { expect: MEMBERS_READ, params: (f) => ({ id: f.photoCheckId }) },
  'POST /api/checks/[id]/refit': { expect: 'AAFNUU', params: check, body: () => ({ detections: { image: { width: 800, height: 600 }, reference: { sizeMm: 150, corners: [[10, 10], [200, 10], [200, 200], [10, 200]] }, holes: [] } }) },
  'GET /api/checks/[id]/report': { expect: MEMBERS_READ, params: check },
  'GET /api/checks/[id]/report.pdf': { expect: MEMBERS_READ, params: check },
  'POST /api/checks/[id]/send': { expect: MACHINIST_UP, params: check, body: () => ({ email: uniqueEmail('helper'), note: 'Have a look' }) },
  'GET /api/checks/[id]/share': { expect: MEMBERS_READ, params: check },
  'POST /api/checks/[id]/share': { expect: MACHINIST_UP, params: check, body: () => ({ expiresInDays: 7 }) },
  'DELETE /api/invitations/[id]': { expect: OWNER_ONLY, params: (f) => ({ id: f.invitationId }) },
  'POST /api/invitations/accept': { expect: 'P', body: () => ({ token: 'x'.repeat(43) }) },
  'GET /api/me': { expect: 'AAAAUU' },
  'POST /api/me/password': { expect: 'AAAAUU', body: () => ({ currentPassword: 'not the current one', newPassword: 'a fresh long passphrase' }) }, // 422 for the wrong current password
  'GET /api/members': { expect: 'AAAAUU' }, // their own workshop's list
  'POST /api/members': { expect: 'AFFAUU', body: () => ({ email: uniqueEmail('invitee'), role: 'reviewer' }) },
  'PATCH /api/members/[userId]': { expect: OWNER_ONLY, params: (f) => ({ userId: f.memberId }), body: () => ({ role: 'machinist' }) },
  'DELETE /api/members/[userId]': { expect: OWNER_ONLY, params: (f) => ({ userId: f.memberId }) },
  'GET /api/presets': { expect: 'AAAAUU' },
  'DELETE /api/share-links/[id]': { expect: MACHINIST_UP, params: (f) => ({ id: f.shareLinkId }) },
  // the token is the only key: every caller but the holder presents a made-up one
  'GET /api/shared/[token]': { expect: 'NNNNNA', params: (f) => ({ token: f.shareToken }) },
  'GET /api/shared/[token]/report.pdf': { expect: 'NNNNNA', params: (f) => ({ token: f.shareToken }) },
  'GET /api/target.pdf': 'P',
};

/** Server actions by file and export, with the wrapper options they must be built with. */
const ACTIONS: Record<string, { auth?: string; permission?: string }> = {
  'app/sign-out/actions.ts#signOutAndLeave': { auth: 'none' }, // sign-out works for anyone; it ends only the caller's own session
};

function routeFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...routeFiles(p));
    else if (name === 'route.ts') out.push(p);
  }
  return out;
}
const apiPath = (file: string) => '/' + relative(join(ROOT, 'app'), file).split('\\').join('/').replace(/\/route\.ts$/, '');
function scanHandlers(): { key: string; file: string; method: Method }[] {
  const found = [];
  for (const file of routeFiles(API)) {
    const src = readFileSync(file, 'utf8');
    for (const m of METHODS) if (new RegExp(`export\\s+(const|async\\s+function|function)\\s+${m}\\b`).test(src)) found.push({ key: `${m} ${apiPath(file)}`, file, method: m });
  }
  return found;
}
function scanActions(dir = join(ROOT, 'app')): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) { out.push(...scanActions(p)); continue; }
    if (!/\.tsx?$/.test(name)) continue;
    const src = readFileSync(p, 'utf8');
    if (!/^\s*['"]use server['"]/.test(src)) continue;
    for (const m of src.matchAll(/export\s+(?:async\s+function|const)\s+(\w+)/g)) out.push(`${relative(ROOT, p).split('\\').join('/')}#${m[1]}`);
  }
  return out;
}

let t: WebTestDb;
let ownerActor: Actor;
let machinistActor: Actor;
const actors: Partial<Record<Who, Actor>> = {};
let ctx: Ctx;
let jpeg: Buffer;

const PATTERN: Pattern = SMALL_PATTERN;

beforeAll(async () => {
  process.env.STORAGE_DIR = join((await import('node:os')).tmpdir(), `gridproof-matrix-${process.pid}`);
  t = await useFreshDatabase();
  ownerActor = await newOwner(t.db, 'Matrix shop');
  machinistActor = await addMember(t.db, ownerActor.workshopId, 'machinist');
  const reviewer = await addMember(t.db, ownerActor.workshopId, 'reviewer');
  const other = await newOwner(t.db, 'Other shop');
  actors.owner = ownerActor;
  actors.machinist = machinistActor;
  actors.reviewer = reviewer;
  actors.other = other;
  jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 120, g: 110, b: 100 } } }).jpeg().toBuffer();
  const report = coreReport(PATTERN);
  const hash = await hashPassword('matrix member password');
  // made once: the records GET handlers only read
  const base = await finishedCheck(t.db, ownerActor, PATTERN, report, { bedName: 'Shared bed' });
  const second = await finishedCheck(t.db, ownerActor, PATTERN, report, { bedName: 'Second bed' });
  const up = await intakePhoto(t.db, getStorage(), { workshopId: ownerActor.workshopId, bedId: second.bedId, userId: ownerActor.user.id, source: jpeg, referenceMm: 150 });
  let n = 0;
  const make = async (): Promise<Fresh> => {
    n++;
    const a = n === 1 ? base : await finishedCheck(t.db, ownerActor, PATTERN, report, { bedName: `Bed ${n}` });
    const comment = await addComment(t.db, machinistActor, a.checkId, { body: 'mine', positionLabel: null });
    const accessory = await createAccessory(t.db, ownerActor, { name: `Fence ${n}`, preset: 'fence-two-bolt', params: {} });
    const invite = await inviteMember(t.db, ownerActor, { email: uniqueEmail('inv'), role: 'reviewer' }, 'http://gridproof.test');
    const member = await insertUser(t.db, { email: uniqueEmail('member'), name: 'Member', passwordHash: hash });
    await insertMembership(t.db, { workshopId: ownerActor.workshopId, userId: member.id, role: 'reviewer' });
    const share = await createShareLink(t.db, ownerActor, a.checkId, { expiresInDays: 7 }, 'http://gridproof.test');
    return {
      bedId: a.bedId, checkId: a.checkId, otherCheckId: base.checkId, photoCheckId: up.check.id, commentId: comment.id, accessoryId: accessory.id,
      invitationId: invite.invitation.id, memberId: member.id, shareLinkId: share.link.id, shareToken: share.link.url.split('/').pop()!,
    };
  };
  const shared = await make();
  ctx = { fresh: make, shared };
});
afterAll(async () => { await t.close(); rmSync(process.env.STORAGE_DIR!, { recursive: true, force: true }); });

type Handler = (req: Request, c?: { params: Promise<Record<string, string | string[] | undefined>> }) => Promise<Response>;

async function callAs(who: Who, handler: Handler, method: Method, path: string, entry: Entry, f: Fresh): Promise<{ status: number; code?: string }> {
  const headers: Record<string, string> = { host: 'gridproof.test' };
  // a session of its own for every call: sign-out (one of the handlers) revokes the session it is sent
  const actor = actors[who];
  if (actor) headers.cookie = await sessionCookie(t.db, actor);
  let params = entry.params?.(f) ?? {};
  if ('token' in params && who !== 'share') params = { ...params, token: 'made-up-token-' + 'z'.repeat(30) };
  let body: BodyInit | undefined;
  if (entry.multipart) {
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(await sharp(jpeg).modulate({ brightness: 0.5 + Math.random() }).jpeg().toBuffer())], { type: 'image/jpeg' }), 'bed.jpg');
    form.append('referenceMm', '150');
    body = form;
  } else if (entry.body) {
    body = JSON.stringify(entry.body(f));
    headers['content-type'] = 'application/json';
  } else if (method !== 'GET') {
    body = undefined;
  }
  const res = await handler(new Request(`http://gridproof.test${path}${entry.query ?? ''}`, { method, headers, body }), { params: Promise.resolve(params) });
  const text = await res.text();
  let code: string | undefined;
  try { code = (JSON.parse(text) as { error?: { code?: string } }).error?.code; } catch { /* not JSON (PDF, image) */ }
  return { status: res.status, code };
}

const classify = (r: { status: number; code?: string }): Outcome =>
  r.status === 401 && r.code === 'unauthenticated' ? 'U' : r.status === 403 ? 'F' : r.status === 404 ? 'N' : 'A';

describe('authorisation matrix', () => {
  it('has an entry for every route handler and server action, and none for a handler that is gone', () => {
    const keys = scanHandlers().map((h) => h.key).sort();
    expect(keys.filter((k) => !(k in MATRIX)), 'handlers without a matrix entry').toEqual([]);
    expect(Object.keys(MATRIX).filter((k) => !keys.includes(k)), 'matrix entries without a handler').toEqual([]);
    const actions = scanActions();
    expect(actions.filter((a) => !(a in ACTIONS)), 'server actions without an entry').toEqual([]);
    expect(Object.keys(ACTIONS).filter((a) => !actions.includes(a))).toEqual([]);
  });

  it('builds every server action with the action() wrapper and the options listed', () => {
    for (const [key, want] of Object.entries(ACTIONS)) {
      const src = readFileSync(join(ROOT, key.split('#')[0]!), 'utf8');
      expect(src, key).toMatch(/from '@\/lib\/http\/action'/);
      const opts = [...src.matchAll(/action\(\s*\{([^}]*)\}/g)].map((m) => m[1]!);
      expect(opts.length, key).toBeGreaterThan(0);
      for (const o of opts) {
        if (want.auth) expect(o, key).toContain(`auth: '${want.auth}'`);
        if (want.permission) expect(o, key).toContain(`permission: '${want.permission}'`);
      }
    }
  });

  it('allows or refuses each caller as designed, and answers 404 for another workshop\'s records', async () => {
    const rows: string[] = [];
    const wrong: string[] = [];
    for (const h of scanHandlers()) {
      const raw = MATRIX[h.key];
      if (!raw) continue;
      const entry: Entry = raw === 'P' ? { expect: 'P' } : raw;
      const mod = (await import(/* @vite-ignore */ pathToFileURL(h.file).href)) as Record<string, Handler>;
      const handler = mod[h.method]!;
      const got: Outcome[] = [];
      const statuses: number[] = [];
      const path = apiPath(h.file).replace(/^\/app/, '');
      for (const who of WHO) {
        const f = h.method === 'GET' ? ctx.shared : await ctx.fresh();
        const r = await callAs(who, handler, h.method, path, entry, f);
        got.push(classify(r));
        statuses.push(r.status);
      }
      const line = `${h.key.padEnd(48)} ${WHO.map((w, i) => `${w}:${got[i]}${statuses[i]}`).join(' ')}`;
      rows.push(line);
      if (entry.expect === 'P') {
        if (new Set(statuses).size !== 1 || got.some((g) => g === 'U' || g === 'F')) wrong.push(`${line}  (public: expected the same answer for all)`);
      } else if (got.join('') !== entry.expect) {
        wrong.push(`${line}  (expected ${entry.expect})`);
      }
    }
    console.log(`\nroute × caller (A allowed, F 403, N 404, U 401; number = status)\n${rows.join('\n')}\n`);
    expect(wrong).toEqual([]);
  }, 240_000);
});
