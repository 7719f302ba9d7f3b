/** Why a position was not seen, in words: each reason of the report contract has its own words; older reports hid only what lay under the printed square. */
import { describe, expect, it } from 'vitest';
import { HIDDEN_REASONS, type Report } from '@/lib/geometry/contract';
import { positionsCsv } from '@/lib/report/csv';
import { HIDDEN_WORDS, hiddenWords } from '@/lib/report/hidden';

describe('not-seen reasons in words', () => {
  it('has distinct words for every reason and none for a seen position', () => {
    expect(new Set(HIDDEN_REASONS.map((r) => HIDDEN_WORDS[r])).size).toBe(HIDDEN_REASONS.length);
    expect(hiddenWords({ hidden: true, hiddenBy: 'border' })).toBe('cut by the edge of the photo');
    expect(hiddenWords({ hidden: true })).toBe('under the reference square');
    expect(hiddenWords({})).toBeNull();
  });

  it('puts the reason in the CSV beside a position that is neither in nor out', () => {
    const report = { positions: [{ family: 'dog', col: 2, row: 0, label: 'dog C1', panel: null, nominal: { x: 60, y: 20 }, measured: null, deviation: null, uncertaintyMm: null, toleranceMm: 0.5, verdict: 'missing', hidden: true, hiddenBy: 'occluded' }] } as unknown as Report;
    const row = positionsCsv(report, 'mm').split('\r\n')[1]!;
    expect(row).toContain(',missing,yes,');
    expect(row.endsWith(',partly covered by something on the bed')).toBe(true);
  });
});
