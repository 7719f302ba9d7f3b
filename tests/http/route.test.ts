import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { AppError } from '@/lib/http/errors';
import { json, MAX_BODY_BYTES, route } from '@/lib/http/route';
import { call, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

const echo = route({ auth: 'none', body: z.object({ count: z.coerce.number().int().min(1), label: z.string().min(1) }) }, async ({ body }) => json(body, 201));

describe('route wrapper', () => {
  it('parses a urlencoded form with z.coerce', async () => {
    const r = await call(echo, { body: 'count=3&label=strip+B', headers: { 'content-type': 'application/x-www-form-urlencoded' } });
    expect(r.status).toBe(201);
    expect(r.json).toEqual({ count: 3, label: 'strip B' });
  });

  it('answers 422 with one message per bad field in the one error shape', async () => {
    const r = await call(echo, { body: { count: 0, label: '' } });
    expect(r.status).toBe(422);
    expect(r.json).toEqual({ error: { code: 'invalid_input', message: expect.any(String), fields: { count: expect.any(String), label: expect.any(String) } } });
  });

  it('refuses a body larger than the limit with 413', async () => {
    const r = await call(echo, { body: JSON.stringify({ label: 'x'.repeat(MAX_BODY_BYTES + 1), count: 1 }) });
    expect(r.status).toBe(413);
  });

  it('maps a thrown AppError to its status and hides an unexpected error behind a 500', async () => {
    const known = route({ auth: 'none' }, async () => {
      throw new AppError('conflict', 409, 'Already there.');
    });
    expect(await call(known)).toMatchObject({ status: 409, json: { error: { code: 'conflict', message: 'Already there.' } } });
    const broken = route({ auth: 'none' }, async () => {
      throw new Error('SQLITE_CONSTRAINT secret detail');
    });
    const original = console.error;
    console.error = () => {};
    const r = await call(broken);
    console.error = original;
    expect(r.status).toBe(500);
    expect(JSON.stringify(r.json)).not.toContain('secret detail');
  });

  it('marks every answer no-store', async () => {
    const r = await call(echo, { body: { count: 1, label: 'a' } });
    expect(r.res.headers.get('cache-control')).toBe('no-store');
  });

  it('answers 401 before parsing when a signed-in route is called anonymously', async () => {
    const guarded = route({ body: z.object({ a: z.string() }) }, async () => ({ ok: true }));
    expect((await call(guarded, { body: {} })).status).toBe(401);
  });
});
