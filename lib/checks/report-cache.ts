/**
 * The parsed report of a check, kept per process for one revision of its stored text. Reading and validating
 * a 300-position report (a 90 KB text read from the database, JSON.parse, zod) costs several ms, and a report
 * is read far more often than it changes. The key is the check id plus `checks.report_rev`, which a database
 * trigger bumps whenever `report_json` changes, whoever writes it (drizzle/0002_report_revision.sql): a re-fit
 * can never be answered from the cache, in this process or any other sharing the database, and nothing needs
 * invalidating. Callers read the small revision row scoped by the actor's workshop (or a live share link)
 * first, so the cache never widens access. Bounded (least recently used out first).
 */
import { ReportSchema, type Report } from '@/lib/geometry/contract';

/** Reports kept per process. */
export const REPORT_CACHE_SIZE = 256;

/** A stored report text and the revision it was read at. */
export type StoredReportText = { reportJson: string | null; reportRev: number };

type Entry = { report: Report; body?: Uint8Array<ArrayBuffer> };
const cache = new Map<string, Entry>();
const keyOf = (checkId: string, rev: number) => `${checkId}:${rev}`;

async function entry(checkId: string, rev: number, load: () => Promise<StoredReportText | undefined>): Promise<Entry | undefined> {
  const key = keyOf(checkId, rev);
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key); // to the back: least recently used goes first
    cache.set(key, hit);
    return hit;
  }
  const stored = await load();
  if (!stored?.reportJson) return undefined;
  const made: Entry = { report: ReportSchema.parse(JSON.parse(stored.reportJson)) };
  // kept under the revision actually read: if a re-fit landed in between, this is the newer text
  cache.set(keyOf(checkId, stored.reportRev), made);
  if (cache.size > REPORT_CACHE_SIZE) cache.delete(cache.keys().next().value!);
  return made;
}

/**
 * The validated report of check `checkId` at revision `rev`; `load` reads the stored text and its revision
 * on a miss. Undefined when the text is gone; throws when it is not a valid report (nothing is kept then).
 */
export async function reportAt(checkId: string, rev: number, load: () => Promise<StoredReportText | undefined>): Promise<Report | undefined> {
  return (await entry(checkId, rev, load))?.report;
}

/** The same report as UTF-8 JSON bytes, ready to send (validated, serialised and encoded once per revision). */
export async function reportBodyAt(checkId: string, rev: number, load: () => Promise<StoredReportText | undefined>): Promise<Uint8Array<ArrayBuffer> | undefined> {
  const e = await entry(checkId, rev, load);
  if (!e) return undefined;
  e.body ??= new TextEncoder().encode(JSON.stringify(e.report));
  return e.body;
}

/** Entries held (for tests). */
export function reportCacheSize(): number {
  return cache.size;
}
