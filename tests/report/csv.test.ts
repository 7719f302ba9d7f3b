import { describe, expect, it } from 'vitest';
import type { Report } from '@/lib/geometry/contract';
import { csvField, exportFileName, positionsCsv, toCsv } from '@/lib/report/csv';

// RFC 4180 §2: CRLF line breaks; fields containing commas, quotes or line breaks are enclosed in double
// quotes; a double quote inside is escaped by preceding it with another double quote.
describe('CSV export', () => {
  it('quotes fields as RFC 4180 says', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "in"')).toBe('"say ""in"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField(null)).toBe('');
    expect(toCsv([['a', 1], ['b', 2]])).toBe('a,1\r\nb,2\r\n');
  });

  const report = {
    positions: [
      { family: 'ins', col: 0, row: 0, label: 'insert A1', panel: 'P1', nominal: { x: 50.8, y: 25.4 }, measured: { x: 50.9, y: 25.2 }, deviation: { dx: 0.1, dy: -0.2, r: Math.hypot(0.1, 0.2) }, uncertaintyMm: 0.05, toleranceMm: 0.5, verdict: 'in', form: { dx: 0.03, dy: -0.04, r: 0.05, uncertaintyMm: 0.01, verdict: 'in' } },
      { family: 'ins', col: 1, row: 0, label: 'insert B1', panel: null, nominal: { x: 101.6, y: 25.4 }, measured: null, deviation: null, uncertaintyMm: null, toleranceMm: 0.5, verdict: 'missing', hidden: true },
    ],
  } as unknown as Report;

  it('writes every position with lengths in mm', () => {
    const lines = positionsCsv(report, 'mm').split('\r\n');
    expect(lines[0]).toBe('label,family,col,row,panel,nominal_x_mm,nominal_y_mm,measured_x_mm,measured_y_mm,dx_mm,dy_mm,deviation_mm,uncertainty_1sigma_mm,tolerance_mm,verdict,under_reference,'
      + 'hole_to_hole_dx_mm,hole_to_hole_dy_mm,hole_to_hole_deviation_mm,hole_to_hole_uncertainty_1sigma_mm,hole_to_hole_verdict,not_seen_because');
    // √(0.1² + 0.2²) = 0.2236… → 0.224
    expect(lines[1]).toBe('insert A1,ins,0,0,P1,50.800,25.400,50.900,25.200,0.100,-0.200,0.224,0.050,0.500,in,,0.030,-0.040,0.050,0.010,in,');
    expect(lines[2]).toBe('insert B1,ins,1,0,,101.600,25.400,,,,,,,0.500,missing,yes,,,,,,under the reference square');
    expect(lines).toHaveLength(4);
    expect(lines[3]).toBe('');
  });

  it('converts to inches at the edge', () => {
    const lines = positionsCsv(report, 'in').split('\r\n');
    expect(lines[0]).toContain('nominal_x_in');
    // 50.8 mm = 2 in; 25.4 mm = 1 in; 0.5 mm = 0.019685 in → 0.01969
    expect(lines[1]).toMatch(/^insert A1,ins,0,0,P1,2\.00000,1\.00000,/);
    expect(lines[1]).toContain(',0.01969,in,');
  });

  it('names files safely', () => {
    expect(exportFileName('Bed #2 / Router', new Date('2026-03-04T10:00:00Z'), 'csv')).toBe('gridproof-bed-2-router-2026-03-04.csv');
  });
});
