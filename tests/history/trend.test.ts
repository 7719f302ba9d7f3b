import { describe, expect, it } from 'vitest';
import { trendSeries, type HistoryRow } from '@/components/history/trend';

const row = (over: Partial<HistoryRow>): HistoryRow => ({ id: 'x', bedId: 'b', title: null, status: 'done', verdict: 'pass', rmsMm: 0.1, maxMm: 0.2, outCount: 0, createdAt: 0, finishedAt: 0, ...over });

describe('history trend', () => {
  it('keeps finished checks only, oldest first, in the display unit', () => {
    const s = trendSeries([
      row({ id: 'new', createdAt: 3000, finishedAt: 3100, rmsMm: 0.254, maxMm: 2.54, outCount: 3 }),
      row({ id: 'queued', status: 'queued', rmsMm: null, maxMm: null, outCount: null, createdAt: 4000, finishedAt: null }),
      row({ id: 'old', createdAt: 1000, finishedAt: 1200, rmsMm: 0.127 }),
      row({ id: 'failed', status: 'failed', rmsMm: null, createdAt: 2000 }),
    ], 'in');
    expect(s.map((p) => p.id)).toEqual(['old', 'new']);
    // 0.254 mm = 0.01 in, 2.54 mm = 0.1 in (25.4 mm per inch)
    expect(s[1]!.rms).toBeCloseTo(0.01, 12);
    expect(s[1]!.max).toBeCloseTo(0.1, 12);
    expect(s[1]!.out).toBe(3);
    expect(s[0]!.t).toBe(1000);
  });
});
