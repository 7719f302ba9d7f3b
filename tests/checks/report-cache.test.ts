/**
 * The per-process report cache: a stored report is validated once per distinct text, a changed text (a re-fit)
 * is never answered from the cache, and an invalid text is refused every time. Reports from the measurement
 * core run on a synthetic scene (tests/services/share-fixtures.ts).
 */
import { describe, expect, it } from 'vitest';
import { parsedReport, REPORT_CACHE_SIZE, reportCacheSize } from '@/lib/checks/report-cache';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { coreReport } from '@/tests/services/share-fixtures';

describe('report cache', () => {
  it('answers the same text with the same parsed report, and a changed text with the new one', () => {
    const a = JSON.stringify(coreReport(SMALL_PATTERN, 3));
    const b = JSON.stringify(coreReport(SMALL_PATTERN, 4));
    const first = parsedReport('c1', a);
    expect(parsedReport('c1', a)).toBe(first);
    const refit = parsedReport('c1', b);
    expect(refit).not.toBe(first);
    expect(refit.summary.rmsMm).toBe((JSON.parse(b) as { summary: { rmsMm: number } }).summary.rmsMm);
  });

  it('refuses a text that is not a valid report, every time', () => {
    expect(() => parsedReport('c2', '{"version":1}')).toThrow();
    expect(() => parsedReport('c2', '{"version":1}')).toThrow();
  });

  it('stays bounded', () => {
    const text = JSON.stringify(coreReport(SMALL_PATTERN, 5));
    for (let i = 0; i < REPORT_CACHE_SIZE + 20; i++) parsedReport(`bulk-${i}`, text);
    expect(reportCacheSize()).toBe(REPORT_CACHE_SIZE);
  });
});
