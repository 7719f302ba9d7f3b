/**
 * Bad numbers through the public API: each answers 422 (or 400) with a message that names the field sent and
 * the allowed range, never a 500 and never work proportional to the number. Ranges are the contract's
 * physical bounds (common practice: beds to 10 m, holes 1–100 mm, pitches 5–2000 mm, a reference square
 * 20–2000 mm, share links 1–90 days). Prints the table `input | what happened`.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as bedsPost } from '@/app/api/beds/route';
import { POST as uploadPost } from '@/app/api/beds/[id]/checks/route';
import type { Pattern } from '@/lib/geometry/contract';
import { createBed } from '@/lib/services/beds';
import { ShareCreateSchema } from '@/lib/services/share';
import { fromZodError } from '@/lib/http/errors';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

const PATTERN: Pattern = {
  version: 1, name: 'dog bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
};
let t: WebTestDb;
let cookie: string;
let bedId: string;
const table: [string, string][] = [];
type Err = { error?: { code: string; message: string; fields?: Record<string, string> } };
const shown = (s: number, e: Err['error']) => `refused ${s} ${e?.code}: ${Object.entries(e?.fields ?? {}).map(([k, v]) => `${k}: ${v}`).join('; ') || e?.message}`;

beforeAll(async () => {
  t = await useFreshDatabase();
  const owner = await newOwner(t.db, 'Numbers shop');
  const machinist = await addMember(t.db, owner.workshopId, 'machinist');
  cookie = await sessionCookie(t.db, machinist);
  bedId = (await createBed(t.db, owner, { name: 'Bed', pattern: PATTERN })).id;
});
afterAll(async () => {
  await t.close();
  console.log(`\ninput | what happened\n--- | ---\n${table.map(([a, b]) => `${a} | ${b}`).join('\n')}\n`);
});

const withFamily = (over: object) => ({ ...PATTERN, families: [{ ...PATTERN.families[0]!, ...over }] });

describe('bad numbers in a bed', () => {
  const cases: [string, unknown, string, RegExp][] = [
    ['family origin {x: -1e308, y: 1e308}', { name: 'B', pattern: withFamily({ origin: { x: -1e308, y: 1e308 } }) }, 'pattern.families.0.origin.x', /origin\.x must lie on the bed \(0 to 960 mm\)/],
    ['holeDiameter 1e308', { name: 'B', pattern: withFamily({ holeDiameter: 1e308 }) }, 'pattern.families.0.holeDiameter', /between 1 and 100 mm/],
    ['pitch 0.001 mm (custom preset)', { name: 'B', preset: { preset: 'custom', pitchMm: 0.001 } }, 'preset.pitchMm', /pitchMm must be between 5 and 2000 mm/],
    ['preset stripWidthMm 1e-320', { name: 'B', preset: { preset: 'm6-50', stripWidthMm: 1e-320 } }, 'preset.stripWidthMm', /0 \(one piece\) or at least 20 mm/],
    ['preset stripWidthMm 0.01', { name: 'B', preset: { preset: 'm6-50', stripWidthMm: 0.01 } }, 'preset.stripWidthMm', /at least 20 mm/],
    ['preset stripWidthMm 5 on a 2440 mm bed', { name: 'B', preset: { preset: 'm6-50', stripWidthMm: 5 } }, 'preset.stripWidthMm', /at least 20 mm/],
    ['preset pitchMm 5 on a 10 × 10 m bed', { name: 'B', preset: { preset: 'custom', pitchMm: 5, bedWidthMm: 10000, bedHeightMm: 10000 } }, 'preset.pitchMm', /at most 20000/],
    ['preset pitchMm "0x96"', { name: 'B', preset: { preset: 'custom', pitchMm: '0x96' } }, 'preset.pitchMm', /decimal number/],
    ['pattern sent as a string', { name: 'B', pattern: '{"version":1}' }, 'pattern', /pattern must be a JSON object/],
  ];
  for (const [input, body, field, message] of cases) {
    it(`refuses ${input}, naming ${field}`, async () => {
      const r = await call(bedsPost, { cookie, body });
      const e = (r.json as Err).error;
      expect(r.status, JSON.stringify(e)).toBe(422);
      expect(e?.fields?.[field], JSON.stringify(e)).toMatch(message);
      table.push([input, shown(r.status, e)]);
    });
  }
});

async function upload(fields: Record<string, string>) {
  const form = new FormData();
  // a JPEG signature (ITU-T T.81 SOI + APP0) is enough: the fields are refused before any analysis
  form.append('photo', new Blob([new Uint8Array([0xff, 0xd8, 0xff, 0xe0, ...new Array(64).fill(0)])], { type: 'image/jpeg' }), 'p.jpg');
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie, host: 'gridproof.test' }, body: form }), { params: Promise.resolve({ id: bedId }) });
  return { status: res.status, json: (await res.json()) as Err };
}

describe('bad numbers and text in an upload', () => {
  const cases: [string, Record<string, string>, string, RegExp][] = [
    ['referenceMm 1e9', { referenceMm: '1e9' }, 'referenceMm', /decimal number between 20 and 2000 mm/],
    ['referenceMm 1000000000', { referenceMm: '1000000000' }, 'referenceMm', /referenceMm must be between 20 and 2000 mm/],
    ['referenceMm "0x96"', { referenceMm: '0x96' }, 'referenceMm', /decimal number/],
    ['a 5000-character title', { referenceMm: '150', title: 'x'.repeat(5000) }, 'title', /at most 120 characters/],
    ['a 300-character title', { referenceMm: '150', title: 'x'.repeat(300) }, 'title', /at most 120 characters/],
  ];
  for (const [input, fields, field, message] of cases) {
    it(`refuses ${input}, naming ${field}`, async () => {
      const r = await upload(fields);
      expect(r.status, JSON.stringify(r.json)).toBe(422);
      expect(r.json.error?.fields?.[field], JSON.stringify(r.json)).toMatch(message);
      expect(r.json.error?.fields?.photo).toBeUndefined();
      table.push([input, shown(r.status, r.json.error)]);
    });
  }
});

describe('bad numbers in a share link', () => {
  it('says what expiresInDays allows when it is null, 0 or "0x10"', () => {
    for (const v of [null, 0, '0x10', 91]) {
      const r = ShareCreateSchema.safeParse({ expiresInDays: v });
      const e = fromZodError(r.error!);
      expect(e.fields?.expiresInDays).toMatch(/expiresInDays must be (a decimal number )?(whole, )?between 1 and 90 days/);
      table.push([`expiresInDays ${JSON.stringify(v)}`, shown(e.status, e.toBody().error)]);
    }
    expect(ShareCreateSchema.parse({}).expiresInDays).toBe(14);
    expect(ShareCreateSchema.parse({ expiresInDays: '7' }).expiresInDays).toBe(7);
  });
});
