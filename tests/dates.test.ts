/**
 * One rule for showing an instant: UTC, said so. Checked against the ECMAScript Date.UTC constructor (an instant
 * built from UTC fields) and ISO 8601 calendar dates and 24-hour times, whatever zone the process runs in.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { formatUtc, formatUtcDay } from '@/lib/dates';

const zone = process.env.TZ;
afterEach(() => { if (zone === undefined) delete process.env.TZ; else process.env.TZ = zone; });

// Chatham Islands UTC+13:45 in December, Newfoundland UTC−03:30 (IANA tz database): far apart, with odd offsets
const ZONES = ['Pacific/Chatham', 'America/St_Johns', 'UTC'];

describe('formatUtc', () => {
  it('writes an instant in UTC to the minute and names the zone, whatever zone the process runs in', () => {
    const at = Date.UTC(2026, 11, 9, 14, 5, 59);
    for (const tz of ZONES) {
      process.env.TZ = tz;
      expect(formatUtc(at)).toBe('2026-12-09 14:05 UTC');
      expect(formatUtc(new Date(at))).toBe('2026-12-09 14:05 UTC');
    }
  });

  it('reads an instant given with an offset as the same UTC time', () => {
    // ISO 8601: 2026-12-10T05:35+05:30 is 2026-12-10T00:05Z
    expect(formatUtc(new Date('2026-12-10T05:35:00+05:30'))).toBe('2026-12-10 00:05 UTC');
  });
});

describe('formatUtcDay', () => {
  it('gives the UTC calendar day even where the local day has already turned', () => {
    const lateEvening = Date.UTC(2026, 11, 9, 23, 30);
    process.env.TZ = 'Pacific/Chatham';
    // the control: in this zone the local day is the 10th (UTC+13:45)
    expect(new Date(lateEvening).getDate()).toBe(10);
    expect(formatUtcDay(lateEvening)).toBe('2026-12-09');
  });
});
