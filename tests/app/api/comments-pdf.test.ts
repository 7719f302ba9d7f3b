/**
 * Comments on a check or one position, the report PDF of a check and the printable target through their
 * route handlers on a real migrated SQLite file. PDFs are read back with pdf-lib's parser.
 */
import { PDFDocument } from 'pdf-lib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DELETE as commentDelete } from '@/app/api/checks/[id]/comments/[commentId]/route';
import { GET as commentsGet, POST as commentPost } from '@/app/api/checks/[id]/comments/route';
import { GET as reportPdf } from '@/app/api/checks/[id]/report.pdf/route';
import { GET as targetPdf } from '@/app/api/target.pdf/route';
import type { Pattern } from '@/lib/geometry/contract';
import type { Actor } from '@/lib/services/actor';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { finishedCheck, handReport } from '@/tests/services/share-fixtures';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

let t: WebTestDb;
let owner: Actor;
let checkId: string;
const cookie = new Map<string, string>();

beforeAll(async () => {
  t = await useFreshDatabase();
  owner = await newOwner(t.db, 'Comment shop');
  const members: [string, Actor][] = [['owner', owner], ['machinist', await addMember(t.db, owner.workshopId, 'machinist')], ['reviewer', await addMember(t.db, owner.workshopId, 'reviewer')], ['reviewer2', await addMember(t.db, owner.workshopId, 'reviewer')], ['stranger', await newOwner(t.db, 'Other')]];
  for (const [k, a] of members) cookie.set(k, await sessionCookie(t.db, a));
  // two families that both have a B2: a bare "B2" is then ambiguous
  const TWO: Pattern = { ...SMALL_PATTERN, families: [...SMALL_PATTERN.families, { id: 'ins', kind: 'threaded-insert', holeDiameter: 8, origin: { x: 148, y: 148 }, pitch: { x: 96, y: 96 }, count: { x: 3, y: 2 }, fit: { toleranceMm: 0.5 } }] };
  ({ checkId } = await finishedCheck(t.db, owner, TWO, handReport(TWO, { 'dog B2': [0.4, 0.1] })));
});
afterAll(async () => { await t.close(); });

const post = (who: string, body: unknown) => call(commentPost, { cookie: cookie.get(who)!, body, params: { id: checkId } });

describe('comments', () => {
  it('takes a reviewer\'s comment on one position, written the way a machinist says it', async () => {
    const r = await post('reviewer', { body: 'binds when hot', positionLabel: 'DOG b2' });
    expect(r.status).toBe(201);
    expect((r.json as { comment: { positionLabel: string; authorName: string } }).comment).toMatchObject({ positionLabel: 'dog B2', authorName: 'A reviewer' });
    expect((await post('machinist', { body: 'Whole bed looks fine after surfacing' })).status).toBe(201);
  });

  it('refuses an empty comment, an unknown position and an ambiguous cell, naming the field', async () => {
    expect((await post('reviewer', { body: '   ' })).status).toBe(422);
    const unknown = await post('reviewer', { body: 'x', positionLabel: 'dog Z9' });
    expect(unknown.status).toBe(422);
    expect(unknown.json).toMatchObject({ error: { fields: { positionLabel: expect.stringContaining('no position') } } });
    const ambiguous = await post('reviewer', { body: 'x', positionLabel: 'b2' });
    expect(ambiguous.status).toBe(422);
    expect(ambiguous.json).toMatchObject({ error: { fields: { positionLabel: expect.stringContaining('dog B2, insert B2') } } });
    // D1 exists only among the dogs (4 columns; the inserts have 3): the cell alone is enough
    expect(((await post('reviewer', { body: 'ok', positionLabel: 'D1' })).json as { comment: { positionLabel: string } }).comment.positionLabel).toBe('dog D1');
  });

  it('lists comments oldest first, hides them from another workshop, and lets only the author or an owner delete', async () => {
    const list = await call(commentsGet, { cookie: cookie.get('owner')!, params: { id: checkId } });
    const comments = (list.json as { comments: { id: string; body: string }[] }).comments;
    expect(comments.map((c) => c.body)).toEqual(['binds when hot', 'Whole bed looks fine after surfacing', 'ok']);
    expect((await call(commentsGet, { cookie: cookie.get('stranger')!, params: { id: checkId } })).status).toBe(404);
    const first = comments[0]!.id;
    expect((await call(commentDelete, { method: 'DELETE', cookie: cookie.get('reviewer2')!, params: { id: checkId, commentId: first } })).status).toBe(403);
    expect((await call(commentDelete, { method: 'DELETE', cookie: cookie.get('owner')!, params: { id: checkId, commentId: first } })).status).toBe(200);
    expect((await call(commentDelete, { method: 'DELETE', cookie: cookie.get('stranger')!, params: { id: checkId, commentId: comments[1]!.id } })).status).toBe(404);
  });
});

describe('PDFs', () => {
  it('exports a check\'s report as PDF for its members, with the comments, named by bed and day', async () => {
    const res = await reportPdf(new Request(`http://gridproof.test/api/checks/${checkId}/report.pdf?paper=letter`, { headers: { cookie: cookie.get('reviewer')!, host: 'gridproof.test' } }), { params: Promise.resolve({ id: checkId }) });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="gridproof-router-bed-\d{4}-\d{2}-\d{2}\.pdf"$/);
    const doc = await PDFDocument.load(new Uint8Array(await res.arrayBuffer()));
    // US Letter is 8.5 × 11 in = 612 × 792 pt (1 pt = 1/72 in)
    const { width, height } = doc.getPage(0).getSize();
    expect([width, height]).toEqual([612, 792]);
    const stranger = await call(reportPdf, { cookie: cookie.get('stranger')!, params: { id: checkId }, path: `/api/checks/${checkId}/report.pdf` });
    expect(stranger.status).toBe(404);
  });

  it('serves the printable target to anyone, on the paper asked for', async () => {
    const res = await targetPdf(new Request('http://gridproof.test/api/target.pdf?size=4in&paper=a4'));
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    const doc = await PDFDocument.load(new Uint8Array(await res.arrayBuffer()));
    // ISO 216 A4: 210 × 297 mm = 595.28 × 841.89 pt
    const { width, height } = doc.getPage(0).getSize();
    expect(width).toBeCloseTo((210 / 25.4) * 72, 1);
    expect(height).toBeCloseTo((297 / 25.4) * 72, 1);
    const bad = await call(targetPdf, { path: '/api/target.pdf?size=7cm' });
    expect(bad.status).toBe(422);
    // the 250 mm target comes on A3 by default (ISO 216: 297 × 420 mm), and is refused on A4
    const large = await PDFDocument.load(new Uint8Array(await (await targetPdf(new Request('http://gridproof.test/api/target.pdf?size=250mm'))).arrayBuffer()));
    expect(large.getPage(0).getSize().width).toBeCloseTo((297 / 25.4) * 72, 1);
    expect(large.getPage(0).getSize().height).toBeCloseTo((420 / 25.4) * 72, 1);
    expect((await call(targetPdf, { path: '/api/target.pdf?size=250mm&paper=a4' })).status).toBe(422);
  });
});
