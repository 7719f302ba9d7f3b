import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as signUpPost } from '@/app/api/auth/sign-up/route';
import { DELETE as bedDelete, GET as bedGet, PATCH as bedPatch } from '@/app/api/beds/[id]/route';
import { GET as bedsGet, POST as bedsPost } from '@/app/api/beds/route';
import { startSession } from '@/lib/auth/session';
import { PatternSchema } from '@/lib/geometry/contract';
import { addMember, call, cookieFrom, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
let ownerCookie: string;
let workshopId: string;
let otherCookie: string;

async function signUpCookie(workshopName: string) {
  const r = await call(signUpPost, { body: { email: uniqueEmail('o'), password: 'a long shop password', name: 'O', workshopName } });
  return { cookie: cookieFrom(r.setCookie), workshopId: (r.json as { workshopId: string }).workshopId };
}
async function cookieFor(userId: string, wid: string) {
  return `gp_session=${await startSession(t.db, { userId, workshopId: wid })}`;
}

// A small hand-made pattern: 20 mm dog holes on a 96 mm grid (common practice for fixture tops).
const dogPattern = {
  version: 1,
  name: 'Assembly table dogs',
  units: 'mm',
  bed: { width: 1000, height: 600 },
  families: [{ id: 'dogs', kind: 'dog-hole', holeDiameter: 20, origin: { x: 68, y: 60 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 6 }, fit: { pinDiameter: 19.9 } }],
};

beforeAll(async () => {
  t = await useFreshDatabase();
  ({ cookie: ownerCookie, workshopId } = await signUpCookie('Harbour Lane Cabinets'));
  ({ cookie: otherCookie } = await signUpCookie('Other shop'));
});
afterAll(async () => t.close());

describe('beds API', () => {
  it('creates a bed from a full pattern (201) and lists it with its summary and no check yet', async () => {
    const r = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Assembly table', pattern: dogPattern } });
    expect(r.status).toBe(201);
    const bed = (r.json as { bed: { id: string; pattern: { positions: number }; lastCheck: unknown } }).bed;
    expect(bed.pattern.positions).toBe(60);
    expect(bed.lastCheck).toBeNull();
    const list = await call(bedsGet, { cookie: ownerCookie });
    expect((list.json as { beds: { id: string }[] }).beds.map((b) => b.id)).toContain(bed.id);
  });

  it('creates a bed from a preset id, building a pattern that passes the contract', async () => {
    const r = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Router', preset: { preset: 'm8-100', bedWidthMm: 1220, bedHeightMm: 2440 } } });
    expect(r.status).toBe(201);
    const id = (r.json as { bed: { id: string } }).bed.id;
    const one = await call(bedGet, { cookie: ownerCookie, params: { id } });
    const pattern = PatternSchema.parse((one.json as { pattern: unknown }).pattern);
    // 100 mm pitch with at least half a pitch margin: 12 × 24 positions on 1220 × 2440 mm.
    expect(pattern.families[0]?.count).toEqual({ x: 12, y: 24 });
    for (const f of pattern.families) {
      expect(f.origin.x).toBeGreaterThanOrEqual(f.pitch.x / 2);
      expect(f.origin.x + (f.count.x - 1) * f.pitch.x).toBeLessThanOrEqual(pattern.bed.width - f.pitch.x / 2);
    }
    const viaPattern = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Router 2', pattern: { preset: 'm6-50' } } });
    expect(viaPattern.status).toBe(201);
  });

  it('answers 422 with the path of the bad field for an invalid pattern or an unknown preset', async () => {
    const bad = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Bad', pattern: { ...dogPattern, families: [{ ...dogPattern.families[0], pitch: { x: -96, y: 96 } }] } } });
    expect(bad.status).toBe(422);
    expect(Object.keys((bad.json as { error: { fields: Record<string, string> } }).error.fields).join(' ')).toMatch(/pattern/);
    const unknown = await call(bedsPost, { cookie: ownerCookie, body: { name: 'X', preset: 'no-such-preset' } });
    expect(unknown.status).toBe(422);
    expect(unknown.json).toMatchObject({ error: { fields: { preset: expect.any(String) } } });
  });

  it('saves a changed pattern as a new revision and renames the bed with PATCH', async () => {
    const r = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Old name', pattern: dogPattern } });
    const id = (r.json as { bed: { id: string } }).bed.id;
    const p = await call(bedPatch, { method: 'PATCH', cookie: ownerCookie, params: { id }, body: { name: 'New name', preset: 'm6-50' } });
    expect(p.status).toBe(200);
    expect(p.json).toMatchObject({ bed: { name: 'New name', patternRevision: 2, presetId: 'm6-50' } });
    const one = await call(bedGet, { cookie: ownerCookie, params: { id } });
    expect((one.json as { revisions: unknown[] }).revisions).toHaveLength(2);
  });

  it("refuses a reviewer's bed with 403 and stores nothing", async () => {
    const reviewer = await addMember(t.db, workshopId, 'reviewer');
    const cookie = await cookieFor(reviewer.user.id, workshopId);
    const before = ((await call(bedsGet, { cookie })).json as { beds: unknown[] }).beds.length;
    const r = await call(bedsPost, { cookie, body: { name: 'Sneaky', pattern: dogPattern } });
    expect(r.status).toBe(403);
    expect(r.json).toMatchObject({ error: { code: 'forbidden' } });
    expect(((await call(bedsGet, { cookie })).json as { beds: unknown[] }).beds.length).toBe(before);
  });

  it('lets a machinist create and edit a bed but only an owner delete it', async () => {
    const machinist = await addMember(t.db, workshopId, 'machinist');
    const cookie = await cookieFor(machinist.user.id, workshopId);
    const r = await call(bedsPost, { cookie, body: { name: 'Machinist bed', pattern: dogPattern } });
    expect(r.status).toBe(201);
    const id = (r.json as { bed: { id: string } }).bed.id;
    expect((await call(bedPatch, { method: 'PATCH', cookie, params: { id }, body: { notes: 'resurfaced' } })).status).toBe(200);
    expect((await call(bedDelete, { method: 'DELETE', cookie, params: { id } })).status).toBe(403);
    expect((await call(bedDelete, { method: 'DELETE', cookie: ownerCookie, params: { id } })).status).toBe(200);
    expect((await call(bedGet, { cookie: ownerCookie, params: { id } })).status).toBe(404);
  });

  it("answers 404 (not 403) for another workshop's bed on GET, PATCH and DELETE, and leaves it alone", async () => {
    const r = await call(bedsPost, { cookie: ownerCookie, body: { name: 'Private bed', pattern: dogPattern } });
    const id = (r.json as { bed: { id: string } }).bed.id;
    for (const [h, method] of [[bedGet, 'GET'], [bedPatch, 'PATCH'], [bedDelete, 'DELETE']] as const) {
      const res = await call(h, { method, cookie: otherCookie, params: { id }, body: method === 'PATCH' ? { name: 'stolen' } : undefined });
      expect(res.status, method).toBe(404);
      expect(res.json).toMatchObject({ error: { code: 'not_found' } });
    }
    expect(((await call(bedsGet, { cookie: otherCookie })).json as { beds: { id: string }[] }).beds.map((b) => b.id)).not.toContain(id);
    expect((await call(bedGet, { cookie: ownerCookie, params: { id } })).json).toMatchObject({ bed: { name: 'Private bed' } });
  });

  it('answers 401 to anonymous bed calls', async () => {
    expect((await call(bedsGet)).status).toBe(401);
    expect((await call(bedsPost, { body: { name: 'x', preset: 'm6-50' } })).status).toBe(401);
  });
});
