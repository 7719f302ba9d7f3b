import { describe, expect, it } from 'vitest';
import type { Report } from '@/lib/geometry/contract';
import { csvField, exportFileName, panelsCsv, positionsCsv, toCsv } from '@/lib/report/csv';

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

  it('writes one row a panel with the move that puts it back, in inches when asked', () => {
    // two 500 × 400 mm panels: L sits 0.508 mm right (0.02 in) and 0.254 mm back, turned 0.01°; R was placed from
    // too few holes (its 1σ is the panel's diagonal, √(500² + 400²) = 640.3 mm)
    const withPanels = {
      ...report,
      pattern: { units: 'mm', panels: [{ id: 'L', x: 0, y: 0, width: 500, height: 400 }, { id: 'R', x: 500, y: 0, width: 500, height: 400 }] },
      panels: [
        { id: 'L', dx: 0.508, dy: 0.254, rotationDeg: 0.01, positions: 12, uncertaintyMm: 0.02, rotationUncertaintyDeg: 0.002, correction: 'move X by −0.51 mm, Y by −0.25 mm' },
        { id: 'R', dx: 0, dy: 0, rotationDeg: 0, positions: 2, uncertaintyMm: Math.hypot(500, 400), correction: 'not enough holes seen on this panel to place it' },
      ],
    } as unknown as Report;
    const lines = panelsCsv(withPanels, 'in').split('\r\n');
    expect(lines[0]).toBe('panel,dx_in,dy_in,rotation_deg,uncertainty_1sigma_in,rotation_uncertainty_1sigma_deg,positions,move_x_in,move_y_in,turn_deg,verdict,correction');
    // 0.508 mm = 0.02 in, 0.254 mm = 0.01 in (25.4 mm to the inch); its corners move about 0.6 mm, over half the
    // 0.5 mm tolerance and twice its 1σ: reseat. The core's words hold a comma, so they are quoted (RFC 4180).
    expect(lines[1]).toBe('L,0.02000,0.01000,0.0100,0.00079,0.0020,12,-0.02000,-0.01000,-0.0100,reseat,"move X by −0.51 mm, Y by −0.25 mm"');
    // 640.312 mm / 25.4 = 25.20915 in; a move of nothing carries no sign
    expect(lines[2]).toBe('R,0.00000,0.00000,0.0000,25.20915,,2,0.00000,0.00000,0.0000,not-placed,not enough holes seen on this panel to place it');
    expect(lines).toHaveLength(4);
  });

  it('names files safely', () => {
    expect(exportFileName('Bed #2 / Router', new Date('2026-03-04T10:00:00Z'), 'csv')).toBe('gridproof-bed-2-router-2026-03-04.csv');
  });
});
