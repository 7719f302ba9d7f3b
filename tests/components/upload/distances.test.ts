import { describe, expect, it } from 'vitest';
import { parseDistanceRows } from '@/components/upload/distances';
import { MeasuredDistancesSchema } from '@/lib/geometry/contract';

describe("the upload form's measured distances", () => {
  it('sends them in millimetres as the API reads them, leaving blank rows out', () => {
    // 1 in = 25.4 mm exactly (international yard and pound agreement, 1959): 66.94 in is 1700.276 mm.
    const r = parseDistanceRows([
      { from: ' insert A1 ', to: 'insert R12', length: '66.94', sigma: '0.01' },
      { from: '', to: '', length: '', sigma: '' },
    ], 'in');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.distances).toHaveLength(1);
    expect(r.distances[0]!.from).toBe('insert A1');
    expect(r.distances[0]!.mm).toBeCloseTo(66.94 * 25.4, 9);
    expect(r.distances[0]!.sigmaMm).toBeCloseTo(0.254, 12);
    expect(MeasuredDistancesSchema.safeParse(r.distances).success).toBe(true);
  });

  it('names the row and what is wrong in it', () => {
    const bad = (row: Partial<{ from: string; to: string; length: string; sigma: string }>) => {
      const r = parseDistanceRows([{ from: 'insert A1', to: 'insert B1', length: '50', sigma: '0.2' }, { from: 'insert A1', to: 'insert C1', length: '100', sigma: '0.2', ...row }], 'mm');
      return r.ok ? null : r.message;
    };
    expect(bad({})).toBeNull();
    expect(bad({ to: '' })).toMatch(/^Distance 2: Give the second position/);
    expect(bad({ length: 'abc' })).toMatch(/^Distance 2: Give the distance as a number/);
    expect(bad({ sigma: '0' })).toMatch(/^Distance 2: The uncertainty must be more than 0/);
    expect(bad({ to: 'INSERT A1' })).toMatch(/same position/);
  });
});
