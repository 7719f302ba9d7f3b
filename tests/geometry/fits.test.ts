import { describe, expect, it } from 'vitest';
import { clearanceHoleMm, fitSourceNote, fitTableRows, fitTablesNote, iso286PinFit, ISO_273, ISO_286_2, radialToleranceMm } from '@/lib/geometry/fits';
import { MM_PER_IN } from '@/lib/geometry/contract';

describe('fit tables', () => {
  it('holds the ISO 273 M6 row: fine 6.4, medium 6.6, coarse 7.0 mm', () => {
    // Source: ISO 273, clearance holes for bolts and screws, M6 row.
    expect(clearanceHoleMm('M6', 'fine')).toBe(6.4);
    expect(clearanceHoleMm('M6', 'medium')).toBe(6.6);
    expect(clearanceHoleMm('M6', 'coarse')).toBe(7.0);
    expect(radialToleranceMm({ fastener: 'M6', clearance: 'medium' }, 6)).toBeCloseTo(0.3, 12);
  });

  it('holds the ASME B18.2.8 1/4 in row: close 0.266, normal 0.281, loose 0.297 in', () => {
    // Source: ASME B18.2.8, clearance holes for bolts and screws, 1/4 in row.
    expect(clearanceHoleMm('1/4-20', 'close') / MM_PER_IN).toBeCloseTo(0.266, 9);
    expect(clearanceHoleMm('1/4-20', 'normal') / MM_PER_IN).toBeCloseTo(0.281, 9);
    expect(clearanceHoleMm('1/4-20', 'loose') / MM_PER_IN).toBeCloseTo(0.297, 9);
    expect(radialToleranceMm({ fastener: '1/4-20', clearance: 'normal' }, 6.35) / MM_PER_IN).toBeCloseTo(0.0155, 9);
  });

  it('holds the ISO 273 rows M3–M12 as the published table gives them', () => {
    // Source: ISO 273 clearance-hole table (fine H12 / medium H13 / coarse H14), as reproduced at
    // engineeringhardware.com/?p=50 and ficientdesign.com/clearance-hole-chart.
    const table: Record<string, [number, number, number]> = {
      M3: [3.2, 3.4, 3.6], M4: [4.3, 4.5, 4.8], M5: [5.3, 5.5, 5.8], M6: [6.4, 6.6, 7.0],
      M8: [8.4, 9.0, 10.0], M10: [10.5, 11.0, 12.0], M12: [13.0, 13.5, 14.5],
    };
    expect(ISO_273.map((r) => r.names[0])).toEqual(Object.keys(table));
    for (const [m, [fine, medium, coarse]] of Object.entries(table)) {
      expect([clearanceHoleMm(m, 'fine'), clearanceHoleMm(m, 'medium'), clearanceHoleMm(m, 'coarse')], m).toEqual([fine, medium, coarse]);
    }
  });

  it('holds the ASME B18.2.8 inch rows #10–1/2 as the published table gives them', () => {
    // Source: ASME B18.2.8-1999 minimum clearance holes, close/normal/loose, as copied at
    // jandesupply.com/reference-clearance-holes.php; the normal-fit drills (#2 = 0.221, 9/32, 11/32, 13/32 in) and
    // loose minimum holes (0.297, 0.359, 0.422, 0.609 in) agree with the table reprinted in Machinery's Handbook
    // 31st ed., p. 1741.
    const table: Record<string, [number, number, number]> = {
      '#10-32': [0.206, 0.221, 0.238], '1/4-20': [0.266, 0.281, 0.297], '5/16-18': [0.328, 0.344, 0.359],
      '3/8-16': [0.391, 0.406, 0.422], '1/2-13': [0.531, 0.562, 0.609],
    };
    for (const [f, [close, normal, loose]] of Object.entries(table)) {
      expect(clearanceHoleMm(f, 'close') / MM_PER_IN, f).toBeCloseTo(close, 9);
      expect(clearanceHoleMm(f, 'normal') / MM_PER_IN, f).toBeCloseTo(normal, 9);
      expect(clearanceHoleMm(f, 'loose') / MM_PER_IN, f).toBeCloseTo(loose, 9);
    }
  });

  it('holds the ISO 286-2 rows: H7 0/+18, +21, +25 µm; g6 −6/−17, −7/−20, −9/−25 µm; h6 0/−13 µm', () => {
    // Source: ISO 286-2 limit deviations for 10–18, 18–30 and 30–50 mm, as tabulated at deepri.com (H7) and in the
    // JIS B 0401-2 shaft table (g6, h6); IT7 over 30–50 mm = 25 µm (h7 tables), H7 = 0/+IT7 (ISO 286-1).
    const got = ISO_286_2.map((r) => `${r.cls} ${r.overMm}-${r.upToMm}: ${r.lowerUm}/${r.upperUm}`);
    expect(got).toEqual(['H7 10-18: 0/18', 'H7 18-30: 0/21', 'H7 30-50: 0/25', 'g6 10-18: -17/-6', 'g6 18-30: -20/-7', 'g6 30-50: -25/-9', 'h6 18-30: -13/0']);
  });

  it('names for every table row its standard and either the published copies it was checked against or "from memory"', () => {
    const rows = fitTableRows();
    expect(rows.length).toBe(7 + 5 + 7);
    for (const { name, row } of rows) {
      expect(row.source, name).toMatch(/^(ISO 273|ASME B18\.2\.8|ISO 286-2)/);
      const checked = (row.readIn?.length ?? 0) > 0;
      expect(checked !== (row.fromMemory === true), `${name}: exactly one of readIn or fromMemory`).toBe(true);
    }
    // the method note counts them and lists any from memory
    const memory = rows.filter((r) => r.row.fromMemory).map((r) => r.name);
    expect(fitTablesNote()).toContain(`${rows.length - memory.length} of ${rows.length} rows`);
    for (const name of memory) expect(fitTablesNote()).toContain(name);
  });

  it("says where a family's tolerance comes from: the table row, the pin and hole, or the pattern", () => {
    expect(fitSourceNote('insert', { fastener: 'M6', clearance: 'medium' }, 6)).toBe('insert: M6 through a medium clearance hole of 6.60 mm (ISO 273), (hole − fastener)/2 = 0.30 mm; that table row was checked against published copies of the table.');
    // Common practice: 3/4 in dogs in 0.770 in holes → 0.010 in radial play.
    expect(fitSourceNote('dog', { pinDiameter: 19.05 }, 19.558)).toBe('dog: a 19.05 mm pin in the 19.56 mm hole, (hole − pin)/2 = 0.25 mm.');
    expect(fitSourceNote('pin', { toleranceMm: 0.05 }, 8)).toBe('pin: 0.05 mm radial tolerance, set in the pattern.');
    expect(fitSourceNote('insert', { fastener: 'M7', clearance: 'fine' }, 7)).toMatch(/^insert: unknown fastener "M7"/);
  });

  it('gives a 0.750 in dog in a 0.770 in hole 0.010 in radial play', () => {
    // Common practice: 3/4 in dogs in 0.770 in holes.
    expect(radialToleranceMm({ pinDiameter: 0.75 * MM_PER_IN }, 0.77 * MM_PER_IN) / MM_PER_IN).toBeCloseTo(0.01, 12);
  });

  it('derives an H7/g6 pin fit at 20 mm from ISO 286-2', () => {
    // Source: ISO 286-2, 18–30 mm: H7 +0/+21 µm, g6 −7/−20 µm → diametral clearance 7…41 µm.
    const f = iso286PinFit('H7', 'g6', 20);
    expect(f.minRadialMm).toBeCloseTo(0.0035, 12);
    expect(f.maxRadialMm).toBeCloseTo(0.0205, 12);
  });

  it('refuses an unknown fastener or a class that does not apply to it', () => {
    expect(() => clearanceHoleMm('M7', 'fine')).toThrow(/unknown fastener/);
    expect(() => clearanceHoleMm('M6', 'loose')).toThrow(/does not apply/);
    expect(() => radialToleranceMm({ pinDiameter: 20 }, 19.9)).toThrow(/does not clear/);
  });
});
