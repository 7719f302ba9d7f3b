/**
 * Accessory placement on a measured bed: cases solved by hand (geometry of two pins on a line), our presets
 * against ISO 273, the placement map against the full minimax fit and a brute-force search.
 */
import { describe, expect, it } from 'vitest';
import { accessoryFit, pinExcess } from '@/lib/geometry/accessory';
import type { Pattern } from '@/lib/geometry/contract';
import { patternToMm } from '@/lib/geometry/units';
import { accessoryPresetById, boardOnBed, firstMeasuredOrigin, placeAccessory, placementMap, quickMinimaxExcess, resolvePins, type AccessorySpec } from '@/lib/services/accessories-placement';
import { handReport } from './share-fixtures';

/** Inserts at 76.2 mm (3 in) pitch, 5 × 4: a common insert grid (common practice). */
const INSERTS: Pattern = {
  version: 1, name: 'insert grid', units: 'mm', bed: { width: 400, height: 320 },
  families: [{ id: 'ins', kind: 'threaded-insert', holeDiameter: 8, origin: { x: 48, y: 46 }, pitch: { x: 76.2, y: 76.2 }, count: { x: 5, y: 4 }, fit: { toleranceMm: 0.5 } }],
};
const PM = patternToMm(INSERTS);

/** Two pins one step (76.2 mm) apart along X, each with 0.25 mm radial clearance. */
const TWO_PINS: AccessorySpec = {
  version: 1,
  pins: [
    { label: 'left', x: 0, y: 0, unit: 'steps', family: 'threaded-insert', diameterMm: 8, clearanceMm: 0.25 },
    { label: 'right', x: 1, y: 0, unit: 'steps', family: 'threaded-insert', diameterMm: 8, clearanceMm: 0.25 },
  ],
};

describe('the origin offered first', () => {
  it('skips a hidden front-left hole for the nearest origin where every pin lands on a measured hole', () => {
    // by hand: A1 (48, 46) is hidden; A2 (48, 122.2), √(48² + 122.2²) = 131.3 mm from the corner, is nearer than
    // B1 (124.2, 46) at √(124.2² + 46²) = 132.4 mm, and from A2 the second pin enters B2, also seen
    const report = handReport(INSERTS, {}, { missing: ['insert A1'] });
    expect(firstMeasuredOrigin(TWO_PINS, PM, report)).toBe('insert A2');
    expect(placeAccessory(TWO_PINS, PM, report, 'insert A2', 0).fits).toBe(true);
  });

  it('skips an origin whose other pin would land on a hidden hole', () => {
    // by hand: with B1 hidden, A1's second pin enters B1; the next nearest, A2 (131.3 mm), has both pins seen
    expect(firstMeasuredOrigin(TWO_PINS, PM, handReport(INSERTS, {}, { missing: ['insert B1'] }))).toBe('insert A2');
  });

  it('offers A1 itself when its holes were all measured', () => {
    expect(firstMeasuredOrigin(TWO_PINS, PM, handReport(INSERTS))).toBe('insert A1');
  });
});

describe('placing an accessory on a measured bed (cases solved by hand)', () => {
  it('fits after a 0.15 mm shift with 0.10 mm to spare when one hole is 0.3 mm off along the line', () => {
    // by hand: split the 0.3 mm between the pins: each is 0.15 mm off, 0.25 − 0.15 = 0.10 mm spare
    const r = placeAccessory(TWO_PINS, PM, handReport(INSERTS, { 'insert B1': [0.3, 0] }), 'insert A1', 0);
    expect(r.fits).toBe(true);
    expect(r.marginMm).toBeCloseTo(0.1, 3);
    expect(Math.abs(r.placement.dx)).toBeCloseTo(0.15, 3);
    expect(r.pins.map((p) => p.hole)).toEqual(['insert A1', 'insert B1']);
  });

  it('fits by a small turn with about 0.25 mm to spare when the hole is 0.3 mm off across the line', () => {
    // by hand: turning by atan(0.3 / 76.2) = 0.2256° lines both pins up; the span grows by only
    // √(76.2² + 0.3²) − 76.2 = 0.0006 mm, so each pin keeps 0.25 − 0.0003 mm
    const r = placeAccessory(TWO_PINS, PM, handReport(INSERTS, { 'insert B1': [0, 0.3] }), 'insert A1', 0);
    expect(r.fits).toBe(true);
    expect(r.marginMm).toBeCloseTo(0.25 - 0.0003, 3);
    expect(r.placement.rotationDeg).toBeCloseTo((Math.atan(0.3 / 76.2) * 180) / Math.PI, 2);
  });

  it('binds by 0.05 mm when the hole is 0.6 mm off along the line, both pins binding', () => {
    // by hand: 0.6 / 2 = 0.30 mm per pin against 0.25 mm of clearance
    const r = placeAccessory(TWO_PINS, PM, handReport(INSERTS, { 'insert B1': [0.6, 0] }), 'insert A1', 0);
    expect(r.fits).toBe(false);
    expect(r.marginMm).toBeCloseTo(-0.05, 3);
    expect(r.binding.sort()).toEqual(['left', 'right']);
    expect(r.pins.every((p) => Math.abs(p.bindsByMm - 0.05) < 1e-3)).toBe(true);
  });

  it('turns the accessory about its origin: at 90° the second pin enters the hole one row up', () => {
    const r = placeAccessory(TWO_PINS, PM, handReport(INSERTS), 'insert B1', 90);
    expect(r.pins.map((p) => p.hole)).toEqual(['insert B1', 'insert B2']);
    expect(r.marginMm).toBeCloseTo(0.25, 4);
  });

  it('refuses a placement whose pin lands off the bed or on a hole the photo did not show', () => {
    expect(() => placeAccessory(TWO_PINS, PM, handReport(INSERTS), 'insert E1', 0)).toThrow(/does not land/);
    expect(() => placeAccessory(TWO_PINS, PM, handReport(INSERTS, {}, { missing: ['insert B1'] }), 'insert A1', 0)).toThrow(/did not show/);
    expect(() => placeAccessory(TWO_PINS, PM, handReport(INSERTS), 'insert Z9', 0)).toThrow(/no position/);
  });
});

describe('accessory presets', () => {
  it('gives a two-bolt fence for M8 the ISO 273 medium clearance hole, 9 mm: 0.5 mm radial play', () => {
    // ISO 273: M8 clearance hole fine 8.4, medium 9, coarse 10 mm
    const spec = accessoryPresetById('fence-two-bolt')!.build({ spanSteps: 4, fastener: 'M8' });
    const pins = resolvePins(spec, PM);
    expect(pins).toHaveLength(2);
    expect(pins[1]!.offsetMm.x).toBeCloseTo(4 * 76.2, 9);
    expect(pins.every((p) => Math.abs(p.clearanceMm - 0.5) < 1e-12)).toBe(true);
  });

  it('builds an L-stop with three bolts and a board carrying the bed\'s pitch', () => {
    expect(accessoryPresetById('stop-l-three-bolt')!.build({}).pins).toHaveLength(3);
    // 300 × 200 mm at 76.2 mm: ⌊(300 − 76.2)/76.2⌋ + 1 = 3 columns, ⌊(200 − 76.2)/76.2⌋ + 1 = 2 rows
    const board = accessoryPresetById('sacrificial-board')!.build({ widthMm: 300, heightMm: 200, pitchXMm: 76.2, pitchYMm: 76.2, fastener: 'M6' });
    expect(board.pins).toHaveLength(6);
    // ISO 273: M6 medium clearance hole 6.6 mm
    expect(board.pins[0]).toMatchObject({ diameterMm: 6, throughHoleMm: 6.6 });
  });

  it('says which family is missing when the bed has no dog holes for a dog pair', () => {
    expect(() => resolvePins(accessoryPresetById('dog-pair')!.build({}), PM)).toThrow(/no dog-hole holes/);
  });
});

describe('the map of every position and turn', () => {
  const report = handReport(INSERTS, { 'insert B1': [0.3, 0], 'insert C2': [0.6, 0], 'insert D3': [0.1, -0.2] });

  it('agrees with the full minimax fit within 2 µm, fits and binds alike', () => {
    const { cells } = placementMap(TWO_PINS, PM, report);
    // 4 × 4 origins along X at turns 0 and 180, 5 × 3 at 90 and 270
    expect(cells).toHaveLength(16 + 15 + 16 + 15);
    // the full fit is slow (≈ 45 ms each): compare every fifth placement and every one touching a moved hole
    const moved = ['insert A1', 'insert B2', 'insert C3'];
    for (const c of cells.filter((c, k) => k % 5 === 0 || moved.includes(c.at))) {
      const full = placeAccessory(TWO_PINS, PM, report, c.at, c.turnDeg);
      expect(Math.abs(c.marginMm! - full.marginMm)).toBeLessThan(2e-3);
      expect(c.status === 'fits').toBe(full.fits);
    }
    expect(cells.find((c) => c.at === 'insert B2' && c.turnDeg === 0)).toMatchObject({ status: 'binds' });
  });

  it('finds a placement no worse than a brute-force search over shifts and turns', () => {
    // brute force: shifts on a 10 µm grid over ±0.5 mm and turns on a 0.02° grid over ±0.5°
    const pins = [{ x: 0, y: 0, clearanceMm: 0.3 }, { x: 120, y: 10, clearanceMm: 0.2 }, { x: 30, y: 90, clearanceMm: 0.25 }];
    const targets = [{ x: 200.12, y: 100.05 }, { x: 320.31, y: 109.9 }, { x: 229.95, y: 190.2 }];
    const at = { x: 200, y: 100 };
    const quick = quickMinimaxExcess(pins.map((p) => ({ x: p.x, y: p.y, c: p.clearanceMm })), targets, at, 0, 1);
    let brute = Infinity;
    for (let th = -0.5; th <= 0.5; th += 0.02) {
      const rad = (th * Math.PI) / 180;
      for (let tx = -0.5; tx <= 0.5; tx += 0.01) for (let ty = -0.5; ty <= 0.5; ty += 0.01) brute = Math.min(brute, Math.max(...pinExcess({ pins, targets, at }, rad, tx, ty)));
    }
    expect(quick).toBeLessThanOrEqual(brute + 1e-6);
    const full = accessoryFit({ pins, targets, at });
    expect(Math.abs(quick + full.marginMm)).toBeLessThan(2e-3);
  });
});

describe('a sacrificial board measured on its own, against the bed', () => {
  const BOARD: Pattern = { ...INSERTS, name: 'board', bed: { width: 250, height: 170 }, families: [{ ...INSERTS.families[0]!, origin: { x: 48, y: 46 }, count: { x: 3, y: 2 } }] };

  it('drops onto the bed when its holes follow the bed\'s holes within their tolerance', () => {
    const board = handReport(BOARD, { 'insert B1': [0.2, 0] });
    const bed = handReport(INSERTS, { 'insert C2': [0.1, 0.1] });
    const r = boardOnBed(board, bed, PM, patternToMm(BOARD), { dc: 1, dr: 1 });
    expect(r.anchor).toBe('insert B2');
    expect(r.paired).toBe(6);
    expect(r.fits).toBe(true);
    expect(r.marginMm).toBeGreaterThan(0.3);
  });

  it('does not drop on when one board hole is 1.2 mm off a bed hole it must meet', () => {
    // by hand: 1.2 mm shared over the best placement leaves more than 0.5 mm on some hole
    const board = handReport(BOARD, { 'insert C2': [1.2, 0] });
    const r = boardOnBed(board, handReport(INSERTS), PM, patternToMm(BOARD));
    expect(r.fits).toBe(false);
    expect(r.binding).toContain('insert C2');
  });
});
