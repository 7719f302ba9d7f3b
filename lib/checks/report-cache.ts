/**
 * The parsed report of a check, kept per process for the stored JSON it came from. Validating a report with
 * zod is the largest cost of `GET /api/checks/{id}/report` (a 300-position report: several ms), and a report
 * is read far more often than it changes. The key is the check id plus a SHA-1 of the stored JSON text, so a
 * re-fit (new JSON) can never be answered from the cache and nothing needs invalidating; the caller has already
 * read the row scoped by the actor's workshop, so the cache never widens access. Bounded (least recently used
 * out first).
 */
import { createHash } from 'node:crypto';
import { ReportSchema, type Report } from '@/lib/geometry/contract';

/** Reports kept per process. */
export const REPORT_CACHE_SIZE = 256;

const cache = new Map<string, { report: Report; body?: string }>();

function entry(checkId: string, reportJson: string): { report: Report; body?: string } {
  const key = `${checkId}:${createHash('sha1').update(reportJson).digest('base64url')}`;
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const made = { report: ReportSchema.parse(JSON.parse(reportJson)) };
  cache.set(key, made);
  if (cache.size > REPORT_CACHE_SIZE) cache.delete(cache.keys().next().value!);
  return made;
}

/** The validated report of `reportJson` (stored for `checkId`), parsed once per distinct text. */
export function parsedReport(checkId: string, reportJson: string): Report {
  return entry(checkId, reportJson).report;
}

/** The validated report of `reportJson` as JSON text, ready to send (serialised once per distinct text). */
export function reportBody(checkId: string, reportJson: string): string {
  const e = entry(checkId, reportJson);
  e.body ??= JSON.stringify(e.report);
  return e.body;
}

/** Entries held (for tests). */
export function reportCacheSize(): number {
  return cache.size;
}
