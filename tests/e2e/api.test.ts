/** The public API against the running, built app (real HTTP, real cookies, a fresh seeded database). */
import { describe, expect, it } from 'vitest';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { Client, E2E_PASSWORD, e2eEmail } from './client';

const demo = (role: 'owner' | 'reviewer') => DEMO_LOGINS.find((l) => l.role === role)!;

async function signedIn(role: 'owner' | 'reviewer') {
  const c = new Client();
  const r = await c.req('POST', '/api/auth/sign-in', { email: demo(role).email, password: DEMO_PASSWORD });
  expect(r.status).toBe(200);
  return c;
}

describe('API over HTTP', () => {
  it('serves the demo bed to the demo owner', async () => {
    const c = await signedIn('owner');
    const r = await c.req('GET', '/api/beds');
    expect(r.status).toBe(200);
    const beds = (r.json as { beds: { name: string; pattern: { positions: number } }[] }).beds;
    expect(beds.length).toBeGreaterThanOrEqual(1);
    expect(beds.every((b) => b.pattern.positions > 0)).toBe(true);
  });

  it("refuses the demo reviewer's new bed with 403 and keeps the list unchanged", async () => {
    const c = await signedIn('reviewer');
    const before = ((await c.req('GET', '/api/beds')).json as { beds: unknown[] }).beds.length;
    const r = await c.req('POST', '/api/beds', { name: 'Reviewer bed', preset: 'm6-50' });
    expect(r.status).toBe(403);
    expect(r.json).toMatchObject({ error: { code: 'forbidden', message: expect.any(String) } });
    expect(((await c.req('GET', '/api/beds')).json as { beds: unknown[] }).beds.length).toBe(before);
  });

  it("answers 404 for another workshop's bed", async () => {
    const owner = await signedIn('owner');
    const demoBed = ((await owner.req('GET', '/api/beds')).json as { beds: { id: string }[] }).beds[0]!;
    const stranger = new Client();
    const up = await stranger.req('POST', '/api/auth/sign-up', { email: e2eEmail('stranger'), password: E2E_PASSWORD, name: 'Stranger', workshopName: 'Elsewhere Works' });
    expect(up.status).toBe(201);
    expect((await stranger.req('GET', `/api/beds/${demoBed.id}`)).status).toBe(404);
    expect((await stranger.req('DELETE', `/api/beds/${demoBed.id}`)).status).toBe(404);
    expect((await owner.req('GET', `/api/beds/${demoBed.id}`)).status).toBe(200);
  });

  it('answers 401 to anonymous calls and refuses a cross-site POST with 403', async () => {
    const anon = new Client();
    expect((await anon.req('GET', '/api/beds')).status).toBe(401);
    const owner = await signedIn('owner');
    const r = await owner.req('POST', '/api/beds', { name: 'From elsewhere', preset: 'm6-50' }, { origin: 'https://elsewhere.example', 'sec-fetch-site': 'cross-site' });
    expect(r.status).toBe(403);
    expect(r.json).toMatchObject({ error: { code: 'cross_site' } });
  });

  it('signs up (201, httpOnly SameSite=Lax cookie), signs out and rejects the old cookie', async () => {
    const c = new Client();
    const up = await c.req('POST', '/api/auth/sign-up', { email: e2eEmail('api'), password: E2E_PASSWORD, name: 'New', workshopName: 'Fresh Shop' });
    expect(up.status).toBe(201);
    expect(up.headers.get('set-cookie')).toMatch(/HttpOnly/i);
    expect(up.headers.get('set-cookie')).toMatch(/SameSite=Lax/i);
    const cookie = c.cookie;
    expect((await c.req('POST', '/api/auth/sign-out')).status).toBe(200);
    c.cookie = cookie;
    expect((await c.req('GET', '/api/beds')).status).toBe(401);
  });
});
