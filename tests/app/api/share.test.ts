/**
 * Share links through the real route handlers on a real migrated SQLite file: made by owners and machinists
 * only, the token ≥ 128 bits and stored only as its SHA-256, expired / revoked / tampered tokens refused, the
 * shared JSON carrying the report and comments but nothing of the photo or the rest of the workshop; the
 * page's status for a dead link set by proxy.ts (410 Gone, RFC 9110 §15.5.11).
 */
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as shareList, POST as sharePost } from '@/app/api/checks/[id]/share/route';
import { POST as sendPost } from '@/app/api/checks/[id]/send/route';
import { DELETE as linkDelete } from '@/app/api/share-links/[id]/route';
import { GET as sharedGet } from '@/app/api/shared/[token]/route';
import { GET as sharedPdf } from '@/app/api/shared/[token]/report.pdf/route';
import { outgoingMail, rateLimits, shareLinks } from '@/db/schema';
import type { Report } from '@/lib/geometry/contract';
import type { Actor } from '@/lib/services/actor';
import { addComment } from '@/lib/services/comments';
import { openSharedReport } from '@/lib/services/share';
import { NextRequest } from 'next/server';
import { proxy } from '@/proxy';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { coreReport, finishedCheck, requeue, SECRET_PHOTO_NAME } from '@/tests/services/share-fixtures';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

let t: WebTestDb;
let owner: Actor;
let machinist: Actor;
let reviewer: Actor;
let checkId: string;
let otherCheckId: string;
const cookies = new Map<Actor, string>();
const cookie = (a: Actor) => cookies.get(a)!;

beforeAll(async () => {
  t = await useFreshDatabase();
  owner = await newOwner(t.db, 'Sharing shop');
  machinist = await addMember(t.db, owner.workshopId, 'machinist');
  reviewer = await addMember(t.db, owner.workshopId, 'reviewer');
  for (const a of [owner, machinist, reviewer]) cookies.set(a, await sessionCookie(t.db, a));
  const report = coreReport(SMALL_PATTERN);
  ({ checkId } = await finishedCheck(t.db, owner, SMALL_PATTERN, report, { bedName: 'Main router', title: 'Monday' }));
  // a second bed of the same workshop that the link must not reveal
  ({ checkId: otherCheckId } = await finishedCheck(t.db, owner, SMALL_PATTERN, report, { bedName: 'Hidden second bed', title: 'Private check' }));
  await addComment(t.db, reviewer, checkId, { body: 'dog B2 binds when hot', positionLabel: 'B2' });
  await addComment(t.db, reviewer, otherCheckId, { body: 'comment on the other check', positionLabel: null });
});
afterAll(async () => { await t.close(); });

const tokenOf = (url: string) => new URL(url).pathname.split('/').pop()!;
const openShared = (token: string) => call(sharedGet, { params: { token }, path: `/api/shared/${token}` });

async function makeLink(a: Actor, body: unknown = { expiresInDays: 7 }) {
  return call(sharePost, { cookie: cookie(a), body, params: { id: checkId } });
}

describe('share links', () => {
  let token: string;
  let linkId: string;

  it('makes a link for a machinist: 201 with an unguessable token stored only as its SHA-256', async () => {
    const r = await makeLink(machinist);
    expect(r.status).toBe(201);
    const link = (r.json as { link: { id: string; url: string; expiresAt: number } }).link;
    expect(link.url).toMatch(/^http:\/\/gridproof\.test\/s\/[A-Za-z0-9_-]{43}$/);
    token = tokenOf(link.url);
    linkId = link.id;
    // 43 base64url characters carry 258 bits, of which 256 are random: well over 128
    expect(Buffer.from(token, 'base64url')).toHaveLength(32);
    expect(link.expiresAt - Date.now()).toBeGreaterThan(6.99 * 86400e3);
    expect(link.expiresAt - Date.now()).toBeLessThanOrEqual(7 * 86400e3);
    const [row] = await t.db.select().from(shareLinks).where(eq(shareLinks.id, linkId));
    expect(row!.tokenHash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(token);
  });

  it('lists each link with who it is for, so that two links can be told apart', async () => {
    const sam = (await makeLink(machinist, { expiresInDays: 7, label: '  Sam at the sign shop ' })).json as { link: { id: string } };
    const bare = (await makeLink(machinist, { expiresInDays: 7, label: '' })).json as { link: { id: string } };
    const sent = (await call(sendPost, { cookie: cookie(machinist), body: { email: 'Lee@Example.test', expiresInDays: 3 }, params: { id: checkId } })).json as { link: { id: string } };
    const list = (await call(shareList, { cookie: cookie(owner), params: { id: checkId } })).json as { links: { id: string; label: string | null }[] };
    const labelOf = (id: string) => list.links.find((l) => l.id === id)?.label;
    expect(labelOf(sam.link.id)).toBe('Sam at the sign shop');
    expect(labelOf(bare.link.id)).toBeNull();
    // a sent link is for the address it went to (as the mail was queued: lower case)
    expect(labelOf(sent.link.id)).toBe('lee@example.test');
    expect((await makeLink(machinist, { expiresInDays: 7, label: 'x'.repeat(121) })).status).toBe(422);
  });

  it("refuses a reviewer's link and a link to a check that is not done", async () => {
    expect((await makeLink(reviewer)).status).toBe(403);
    await requeue(t.db, otherCheckId);
    const r = await call(sharePost, { cookie: cookie(owner), body: { expiresInDays: 7 }, params: { id: otherCheckId } });
    expect(r.status).toBe(409);
  });

  it('refuses expiries outside 1–90 days', async () => {
    expect((await makeLink(owner, { expiresInDays: 0 })).status).toBe(422);
    expect((await makeLink(owner, { expiresInDays: 91 })).status).toBe(422);
  });

  it('opens the report without an account and counts each view', async () => {
    const r = await openShared(token);
    expect(r.status).toBe(200);
    expect(r.res.headers.get('vary')).toContain('Accept');
    const v = r.json as { bedName: string; checkTitle: string; report: { summary: { verdict: string }; positions: unknown[] }; comments: { body: string; positionLabel: string }[] };
    expect(v.bedName).toBe('Main router');
    expect(v.checkTitle).toBe('Monday');
    expect(v.report.positions).toHaveLength(12);
    expect(v.comments).toEqual([expect.objectContaining({ body: 'dog B2 binds when hot', positionLabel: 'dog B2' })]);
    await openShared(token);
    const list = await call(shareList, { cookie: cookie(reviewer), params: { id: checkId } });
    const links = (list.json as { links: { id: string; viewCount: number; live: boolean }[] }).links;
    expect(links.find((l) => l.id === linkId)).toMatchObject({ viewCount: 2, live: true });
    // the answer is the service's view, whole: the report text is cached per revision, the rest made each time
    const second = await openShared(token);
    const { comments, ...rest } = second.json as Record<string, unknown>;
    expect(second.json).toEqual(JSON.parse(JSON.stringify(await openSharedReport(t.db, token))));
    expect(Object.keys(rest).sort()).toEqual(['bedName', 'checkTitle', 'checkedAt', 'expiresAt', 'fits', 'photoNote', 'report']);
    expect(comments).toHaveLength(1);
    // the page draws only the verdict: it asks for no comments and gets none
    expect((await openSharedReport(t.db, token, { comments: false })).comments).toEqual([]);
    expect(JSON.stringify(list.json)).not.toContain(token);
  });

  it('shows nothing of the photo and nothing else of the workshop', async () => {
    const r = await openShared(token);
    const text = JSON.stringify(r.json);
    const v = r.json as { report: { camera: { focalPx: number }; unmatched: unknown[]; diagnostics?: unknown } };
    // the measurement core's report carries the camera and detector diagnostics; the shared one does not
    expect(v.report.camera).toEqual({ focalPx: 0, k1: 0, k2: 0 });
    expect(v.report.diagnostics).toBeUndefined();
    expect(v.report.unmatched).toEqual([]);
    for (const secret of [SECRET_PHOTO_NAME, 'Hidden second bed', 'Private check', 'comment on the other check', 'Sharing shop', owner.user.email, reviewer.user.email, owner.workshopId, otherCheckId, 'focalSource', 'principalPoint', 'photoId', 'sha256']) {
      expect(text).not.toContain(secret);
    }
  });

  it('carries the hole-to-hole verdicts and the overall size and squareness line of the report', async () => {
    const v = (await openShared(token)).json as { report: Report };
    const core = coreReport(SMALL_PATTERN);
    // The same figures the measurement core wrote, position by position (the link's report is the stored one).
    expect(v.report.positions.map((p) => p.form)).toEqual(core.positions.map((p) => p.form));
    expect(v.report.positions.some((p) => p.form)).toBe(true);
    expect(v.report.lattice.shapeCheck).toEqual(core.lattice.shapeCheck);
    expect(v.report.summary.shapeSentence).toBe(core.summary.shapeSentence);
  });

  it('refuses a tampered or truncated token with 404', async () => {
    const flipped = token.slice(0, -1) + (token.endsWith('A') ? 'B' : 'A');
    expect((await openShared(flipped)).status).toBe(404);
    expect((await openShared(token.slice(0, 20))).status).toBe(404);
    expect((await openShared(`${token}x`)).status).toBe(404);
  });

  it('answers 410 once the link has expired', async () => {
    const r = await makeLink(owner, { expiresInDays: 1 });
    const { id, url } = (r.json as { link: { id: string; url: string } }).link;
    expect((await openShared(tokenOf(url))).status).toBe(200);
    await t.db.update(shareLinks).set({ expiresAt: Date.now() - 1 }).where(eq(shareLinks.id, id));
    const gone = await openShared(tokenOf(url));
    expect(gone.status).toBe(410);
    expect(gone.json).toMatchObject({ error: { code: 'share_link_gone' } });
  });

  it('revokes a link: the URL then answers 410, and a reviewer or another workshop cannot revoke', async () => {
    expect((await call(linkDelete, { method: 'DELETE', cookie: cookie(reviewer), params: { id: linkId } })).status).toBe(403);
    const stranger = await newOwner(t.db, 'Stranger shop');
    const strangerCookie = await sessionCookie(t.db, stranger);
    expect((await call(linkDelete, { method: 'DELETE', cookie: strangerCookie, params: { id: linkId } })).status).toBe(404);
    const r = await call(linkDelete, { method: 'DELETE', cookie: cookie(machinist), params: { id: linkId } });
    expect(r.status).toBe(200);
    expect((await openShared(token)).status).toBe(410);
    const pdf = await sharedPdf(new Request(`http://gridproof.test/api/shared/${token}/report.pdf`), { params: Promise.resolve({ token }) });
    expect(pdf.status).toBe(410);
  });

  it("sets 410 on the page's answer (proxy.ts) for a revoked or expired token, and passes a live or unknown one on", async () => {
    const status = async (tk: string) => (await proxy(new NextRequest(`http://gridproof.test/s/${tk}`))).status;
    expect(await status(token)).toBe(410); // revoked above
    const r = await makeLink(owner, { expiresInDays: 1 });
    const { id, url } = (r.json as { link: { id: string; url: string } }).link;
    expect(await status(tokenOf(url))).toBe(200);
    await t.db.update(shareLinks).set({ expiresAt: Date.now() - 1 }).where(eq(shareLinks.id, id));
    expect(await status(tokenOf(url))).toBe(410);
    // a token no link has, a malformed one, a broken escape: on to the page, which answers 404
    expect(await status('A'.repeat(43))).toBe(200);
    expect(await status('short')).toBe(200);
    expect(await status('%E0%A4%A')).toBe(200);
  });

  it('serves the shared report as PDF while the link lives', async () => {
    const r = await makeLink(owner);
    const tk = tokenOf((r.json as { link: { url: string } }).link.url);
    const res = await sharedPdf(new Request(`http://gridproof.test/api/shared/${tk}/report.pdf`), { params: Promise.resolve({ token: tk }) });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    const bytes = Buffer.from(await res.arrayBuffer());
    // PDF 1.7 (ISO 32000-1 §7.5.2): a file begins with the %PDF- header
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(bytes.toString('latin1')).not.toContain('Sharing shop');
  });
});

describe('sending a report to a helper', () => {
  it('writes the link and the report mail in one go, the mail carrying the link, the note and the map', async () => {
    const r = await call(sendPost, { cookie: cookie(machinist), body: { email: 'Helper@Example.test', note: 'Can you look at B2?', expiresInDays: 3 }, params: { id: checkId } });
    expect(r.status).toBe(201);
    const { link, sentTo } = r.json as { link: { url: string }; sentTo: string };
    expect(sentTo).toBe('helper@example.test');
    const mails = await t.db.select().from(outgoingMail).where(eq(outgoingMail.toAddress, 'helper@example.test'));
    expect(mails).toHaveLength(1);
    const m = mails[0]!;
    expect(m.kind).toBe('report');
    expect(m.status).toBe('queued');
    expect(m.text).toContain(link.url);
    expect(m.text).toContain('Can you look at B2?');
    expect(m.text).toContain('Sharing shop');
    expect(m.html).toContain('data:image/png;base64,');
    expect((await openShared(tokenOf(link.url))).status).toBe(200);
  });

  it('stops a sender after 30 report mails in an hour (429)', async () => {
    const sender = await addMember(t.db, owner.workshopId, 'machinist');
    const c = await sessionCookie(t.db, sender);
    // the limit counts per sender in rate_limits; fill the hour's window as 30 sends would
    await t.db.insert(rateLimits).values({ key: `share-send:${sender.user.id}`, count: 30, resetAt: Date.now() + 3600e3 });
    const r = await call(sendPost, { cookie: c, body: { email: 'limit@example.test' }, params: { id: checkId } });
    expect(r.status).toBe(429);
    expect(await t.db.select().from(outgoingMail).where(eq(outgoingMail.toAddress, 'limit@example.test'))).toHaveLength(0);
  });

  it("refuses a reviewer's send and queues no mail", async () => {
    const r = await call(sendPost, { cookie: cookie(reviewer), body: { email: 'nobody@example.test' }, params: { id: checkId } });
    expect(r.status).toBe(403);
    expect(await t.db.select().from(outgoingMail).where(eq(outgoingMail.toAddress, 'nobody@example.test'))).toHaveLength(0);
  });
});
