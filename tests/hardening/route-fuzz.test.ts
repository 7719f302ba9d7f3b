/**
 * No input answers 5xx: every route of the route table (read from app/api/**\/route.ts) and every method it
 * exports is called with seeded random garbage (fast-check) — a malformed or foreign session cookie or a live
 * one, path parameters that are garbage or real ids of another record kind, query strings and bodies of
 * random JSON, broken JSON, forms and nonsense content types — against a real migrated database and real
 * storage. A 4xx is an answer the person can act on; a 5xx is a defect. The seed is printed (FUZZ_SEED
 * replays it). The malformed-cookie cases are the ones that answered 500 (`%E0%A4%A`: a percent escape cut
 * short, which decodeURIComponent refuses, ECMA-262 §19.2.6.2).
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { POST as signOutPost } from '@/app/api/auth/sign-out/route';
import { GET as meGet } from '@/app/api/me/route';
import { intakePhoto } from '@/lib/checks/intake';
import { createBed } from '@/lib/services/beds';
import { getStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { noiseJpeg } from '@/tests/fixtures/make-bad-inputs';
import { loadHandler, routeTable, type RouteHandler } from '@/tests/web/route-table';
import { call, newOwner, TEST_PASSWORD, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import type { Actor } from '@/lib/services/actor';

const SEED = Number(process.env.FUZZ_SEED ?? Math.floor(Math.random() * 2 ** 31));
const RUNS_PER_ROUTE = Number(process.env.FUZZ_RUNS ?? 40);

let t: WebTestDb;
let owner: Actor;
const ids: string[] = [];

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  owner = await newOwner(t.db, 'Fuzz shop');
  const bed = await createBed(t.db, owner, { name: 'Bed', pattern: SMALL_PATTERN });
  const r = await intakePhoto(t.db, getStorage(), { workshopId: owner.workshopId, bedId: bed.id, userId: owner.user.id, source: await noiseJpeg(), referenceMm: 150 });
  ids.push(bed.id, r.check.id, r.photo.id, owner.user.id, owner.workshopId);
  console.log(JSON.stringify({ routeFuzzSeed: SEED }));
});
afterAll(async () => { await t.close(); });

/** Any string of bytes a Cookie header can carry (HTTP field values: visible ASCII, space, tab and obs-text 0x80–0xFF). */
const headerBytes = fc.string({ unit: fc.oneof(fc.integer({ min: 0x20, max: 0x7e }), fc.integer({ min: 0x80, max: 0xff }), fc.constant(0x09)).map((c) => String.fromCharCode(c)), maxLength: 300 });
const MALFORMED_COOKIES = ['gp_session=%E0%A4%A', 'gp_session=%', 'gp_session=%%%', 'gp_session=', 'gp_session', '=; ;;gp_session=%FF%FE', `gp_session=${'A'.repeat(8000)}`, 'gp_session=Fe26.2**a*b*c*d*e*f'];
type CookieKind = { kind: 'live' } | { kind: 'raw'; header: string };
const cookieArb: fc.Arbitrary<CookieKind> = fc.oneof(
  fc.constant({ kind: 'live' } as const),
  fc.constantFrom(...MALFORMED_COOKIES).map((header) => ({ kind: 'raw', header }) as const),
  headerBytes.map((v) => ({ kind: 'raw', header: `gp_session=${v}` }) as const),
  headerBytes.map((header) => ({ kind: 'raw', header }) as const),
);
const garbageText = fc.oneof(fc.string({ maxLength: 80 }), fc.constantFrom('', '%', '%E0%A4%A', '../../etc/passwd', '\u0000', 'null', '-1', '1e309', 'x'.repeat(3000), '😀', '[object Object]'));
const paramArb = fc.oneof(garbageText, fc.constantFrom(...Array.from({ length: 5 }, (_, i) => i)).map((i) => ids[i]!));
const queryArb = fc.dictionary(fc.constantFrom('size', 'format', 'units', 'unit', 'limit', 'cursor', 'page', 'q', 'token', 'expiresInDays', garbageText as unknown as string), garbageText, { maxKeys: 4 });
type BodyKind = { type: string | null; text: string };
const bodyArb: fc.Arbitrary<BodyKind | null> = fc.oneof(
  fc.constant(null),
  fc.jsonValue({ maxDepth: 4 }).map((v) => ({ type: 'application/json', text: JSON.stringify(v) })),
  fc.dictionary(fc.constantFrom('email', 'password', 'name', 'pattern', 'preset', 'referenceMm', 'role', 'body', 'title', 'format', 'token', 'workshopId', 'edits', 'to'), fc.jsonValue({ maxDepth: 3 }))
    .map((v) => ({ type: 'application/json', text: JSON.stringify(v) })),
  fc.constantFrom('{', '[1,', '{"a":}', '\u0000', '['.repeat(5000), '{"__proto__":{"polluted":1}}', '1e99999').map((text) => ({ type: 'application/json', text })),
  garbageText.map((text) => ({ type: 'application/x-www-form-urlencoded', text: `referenceMm=${encodeURIComponent(text)}&email=${encodeURIComponent(text)}&%E0=1` })),
  garbageText.map((text) => ({ type: 'multipart/form-data; boundary=zz', text: `--zz\r\nContent-Disposition: form-data; name="photo"; filename="a.jpg"\r\n\r\n${text}\r\n--zz--` })),
  fc.tuple(fc.constantFrom('text/plain', 'multipart/form-data', 'application/xml', null), garbageText).map(([type, text]) => ({ type, text })),
);

async function send(handler: RouteHandler, method: string, path: string, params: Record<string, string>, cookie: CookieKind, query: Record<string, string>, body: BodyKind | null): Promise<Response> {
  const headers: Record<string, string> = { host: 'gridproof.test' };
  headers.cookie = cookie.kind === 'live' ? await sessionCookie(t.db, owner) : cookie.header;
  if (body?.type) headers['content-type'] = body.type;
  const url = new URL(`http://gridproof.test${path}`);
  for (const [k, v] of Object.entries(query)) url.searchParams.set(k, v);
  const withBody = body && method !== 'GET' && method !== 'HEAD';
  return handler(new Request(url, { method, headers, ...(withBody ? { body: body.text } : {}) }), { params: Promise.resolve(params) });
}

describe('no input answers 5xx', () => {
  it('a malformed session cookie is a signed-out request on /api/me, sign-in and sign-out', async () => {
    for (const cookie of MALFORMED_COOKIES) {
      expect((await call(meGet, { cookie }).then((r) => r.status)), cookie.slice(0, 40)).toBe(401);
      expect((await call(signOutPost, { method: 'POST', cookie })).status, cookie.slice(0, 40)).toBe(200);
    }
    const signIn = await call(signInPost, { cookie: 'gp_session=%E0%A4%A', body: { email: owner.user.email, password: TEST_PASSWORD } });
    expect(signIn.status).toBe(200);
  });

  it('every route and method of the route table, with seeded garbage', async () => {
    const table = routeTable();
    expect(table.length).toBeGreaterThan(30);
    for (const entry of table) {
      const handler = await loadHandler(entry);
      await fc.assert(
        fc.asyncProperty(fc.tuple(...entry.params.map(() => paramArb)), cookieArb, queryArb, bodyArb, async (values, cookie, query, body) => {
          const params = Object.fromEntries(entry.params.map((name, i) => [name, values[i]!]));
          const res = await send(handler, entry.method, entry.path, params, cookie, query, body);
          const text = await res.text();
          if (res.status >= 500) throw new Error(`${entry.key} answered ${res.status}: ${text.slice(0, 200)}`);
        }),
        { seed: SEED, numRuns: RUNS_PER_ROUTE, endOnFailure: true },
      );
    }
  }, 300_000);
});
