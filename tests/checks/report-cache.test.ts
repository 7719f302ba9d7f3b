/**
 * The per-process report cache and the revision that keys it: a stored report is read and validated once per
 * revision, any change of the stored text (a re-fit, or a raw UPDATE from another process) bumps the revision
 * in the database itself so it is never answered from the cache, and an invalid text is refused every time.
 * Reports come from the measurement core run on a synthetic scene (tests/services/share-fixtures.ts), on a
 * real migrated SQLite file.
 */
import { eq, sql } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { getCheckReportText } from '@/db/queries/checks';
import { checks } from '@/db/schema';
import { getCheckReport, getCheckReportJson } from '@/lib/checks/api';
import { REPORT_CACHE_SIZE, reportAt, reportBodyAt, reportCacheSize } from '@/lib/checks/report-cache';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { tempDb } from '@/tests/queue/helpers';
import { coreReport, finishedCheck } from '@/tests/services/share-fixtures';
import { newOwner } from '@/tests/web/helpers';

const t = await tempDb();
afterAll(() => t.close());
const revOf = async (id: string) => (await t.db.select({ rev: checks.reportRev }).from(checks).where(eq(checks.id, id)))[0]!.rev;

describe('report revision', () => {
  it('is bumped by the database whenever the report text changes, whoever writes it, and only then', async () => {
    const owner = await newOwner(t.db);
    const { checkId } = await finishedCheck(t.db, owner, SMALL_PATTERN, coreReport(SMALL_PATTERN, 3));
    const r0 = await revOf(checkId);
    await t.db.update(checks).set({ title: 'renamed', progress: 1 }).where(eq(checks.id, checkId));
    expect(await revOf(checkId)).toBe(r0);
    await t.db.update(checks).set({ reportJson: JSON.stringify(coreReport(SMALL_PATTERN, 4)) }).where(eq(checks.id, checkId));
    expect(await revOf(checkId)).toBe(r0 + 1);
    // raw SQL, as another program sharing the database might write it
    await t.db.run(sql`update checks set report_json = null where id = ${checkId}`);
    expect(await revOf(checkId)).toBe(r0 + 2);
    await t.db.run(sql`update checks set report_json = null where id = ${checkId}`); // unchanged text
    expect(await revOf(checkId)).toBe(r0 + 2);
  });

  it('makes a re-fit visible at once through the report use cases, while an unchanged report is read once', async () => {
    const owner = await newOwner(t.db);
    const a = coreReport(SMALL_PATTERN, 5);
    const b = coreReport(SMALL_PATTERN, 6);
    const { checkId } = await finishedCheck(t.db, owner, SMALL_PATTERN, a);
    const first = await getCheckReport(t.db, owner, checkId);
    expect(await getCheckReport(t.db, owner, checkId)).toBe(first);
    expect(first.summary.rmsMm).toBe(a.summary.rmsMm);
    await t.db.update(checks).set({ reportJson: JSON.stringify(b) }).where(eq(checks.id, checkId));
    const refit = await getCheckReport(t.db, owner, checkId);
    expect(refit).not.toBe(first);
    expect(refit.summary.rmsMm).toBe(b.summary.rmsMm);
    const body = JSON.parse(new TextDecoder().decode(await getCheckReportJson(t.db, owner, checkId))) as { summary: { rmsMm: number } };
    expect(body.summary.rmsMm).toBe(b.summary.rmsMm);
  });
});

describe('report cache', () => {
  it('reads the stored text only on a miss', async () => {
    const owner = await newOwner(t.db);
    const { checkId } = await finishedCheck(t.db, owner, SMALL_PATTERN, coreReport(SMALL_PATTERN, 7));
    const rev = await revOf(checkId);
    let reads = 0;
    const load = () => { reads++; return getCheckReportText(t.db, owner.workshopId, checkId); };
    const first = await reportAt(checkId, rev, load);
    expect(await reportAt(checkId, rev, load)).toBe(first);
    const bytes = await reportBodyAt(checkId, rev, load);
    expect(await reportBodyAt(checkId, rev, load)).toBe(bytes);
    expect(reads).toBe(1);
    expect(JSON.parse(new TextDecoder().decode(bytes))).toEqual(first);
  });

  it('refuses a text that is not a valid report, every time, and keeps nothing', async () => {
    const size = reportCacheSize();
    const load = async () => ({ reportJson: '{"version":1}', reportRev: 0 });
    await expect(reportAt('bad', 0, load)).rejects.toThrow();
    await expect(reportAt('bad', 0, load)).rejects.toThrow();
    expect(reportCacheSize()).toBe(size);
  });

  it('answers nothing for a report that is gone', async () => {
    expect(await reportAt('gone', 0, async () => ({ reportJson: null, reportRev: 1 }))).toBeUndefined();
    expect(await reportBodyAt('gone', 0, async () => undefined)).toBeUndefined();
  });

  it('stays bounded', async () => {
    const text = JSON.stringify(coreReport(SMALL_PATTERN, 8));
    for (let i = 0; i < REPORT_CACHE_SIZE + 20; i++) await reportAt(`bulk-${i}`, 0, async () => ({ reportJson: text, reportRev: 0 }));
    expect(reportCacheSize()).toBe(REPORT_CACHE_SIZE);
  });
});
