/**
 * Holes seen only in part are not measured. Rendered photos (lib/vision/render, whose truth is the scene's exact
 * geometry) lay the A4 sheet (210 × 297 mm, ISO 216) so that its edges cross a column and two rows of 20 mm dog
 * holes at chosen fractions of their diameter, and a light board and a black clamp bar over other holes. Every hole
 * whose rim the sheet or an object meets is reported not seen, never in or out, with the reason; holes a few mm clear
 * of the sheet are still measured (so a detector that hid everything near the sheet would fail).
 */
import { describe, expect, it } from 'vitest';
import { PatternSchema, type Report } from '@/lib/geometry/contract';
import { analyzeImage } from '@/lib/vision';
import { synthesize, type TruthHole } from '@/lib/vision/render';

const D = 20;
const PATTERN = PatternSchema.parse({
  version: 1, name: 'Dog holes at 60 mm', units: 'mm', bed: { width: 900, height: 600 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: D, origin: { x: 60, y: 60 }, pitch: { x: 60, y: 60 }, count: { x: 14, y: 9 }, fit: { fastener: 'M8', clearance: 'medium' } }],
});
const SHEET: [number, number] = [210, 297];
const XC = 480; // the column the sheet's right edge crosses
const YR = 420; // the row its top edge crosses; its bottom edge then crosses the row at YR − 300

/** Gap between a hole's rim and a rectangle (bed mm); negative or zero when the rectangle reaches over the rim. */
function rimGap(h: TruthHole, r: { x0: number; y0: number; x1: number; y1: number }): number {
  const dx = Math.max(r.x0 - h.bed.x, 0, h.bed.x - r.x1);
  const dy = Math.max(r.y0 - h.bed.y, 0, h.bed.y - r.y1);
  return Math.hypot(dx, dy) - D / 2;
}

async function scene(right: number, top: number, seed: number) {
  // right edge at XC − D/2 + right·D covers `right` of the column's diameter; the top edge likewise for row YR
  const x1 = XC - D / 2 + right * D;
  const y1 = YR - D / 2 + top * D;
  const sheet = { x0: x1 - SHEET[0], y0: y1 - SHEET[1], x1, y1 };
  const board = { x: 620, y: 40, width: 35, height: 160, tone: 0.75 }; // covers the left 0.25 D of the holes at x = 660
  const clamp = { x: 760, y: 370, width: 120, height: 14 }; // a black bar across the lower part of the holes at y = 360
  const { jpeg, truth } = await synthesize(PATTERN, {
    seed, width: 1600, height: 1200, scalePpm: 0, squarenessDeg: 0, misplacedCount: 0, panelOffsetMm: 0,
    sheetMm: SHEET, targetCentreMm: [(sheet.x0 + sheet.x1) / 2, (sheet.y0 + sheet.y1) / 2], targetRotationDeg: 0, occluders: [board, clamp],
  });
  const { report } = await analyzeImage(jpeg, PATTERN, { referenceMm: 150 });
  const at = (h: TruthHole) => report.positions.find((p) => p.col === h.col && p.row === h.row)!;
  return { truth, report, at, sheet, board: { x0: board.x, y0: board.y, x1: board.x + board.width, y1: board.y + board.height }, clamp: { x0: clamp.x, y0: clamp.y, x1: clamp.x + clamp.width, y1: clamp.y + clamp.height } };
}

function expectNotMeasured(p: Report['positions'][number]) {
  expect(p.measured).toBeNull();
  expect(p.deviation).toBeNull();
  expect(p.verdict).toBe('missing');
}

describe('partly hidden holes', () => {
  // the bottom edge crosses the row at YR − 300 by (YR − 300 + D/2) − (y1 − 297) = D·(0.85 − top)
  for (const [right, top, seed] of [[0.1, 0.5, 41], [0.25, 0.75, 42]] as const) {
    it(`are not measured where the sheet's edges cover ${right}, ${top} and ${(0.85 - top).toFixed(2)} of their diameter, and say it is the sheet`, async () => {
      const s = await scene(right, top, seed);
      const col = s.truth.holes.filter((h) => Math.abs(h.bed.x - XC) < 1 && h.bed.y > s.sheet.y0 - D / 2 && h.bed.y < s.sheet.y1 + D / 2);
      const topRow = s.truth.holes.filter((h) => Math.abs(h.bed.y - YR) < 1 && h.bed.x > s.sheet.x0 && h.bed.x < s.sheet.x1);
      const bottomRow = s.truth.holes.filter((h) => Math.abs(h.bed.y - (YR - 300)) < 1 && h.bed.x > s.sheet.x0 && h.bed.x < s.sheet.x1);
      expect(col.length).toBeGreaterThanOrEqual(4);
      expect(topRow.length).toBeGreaterThanOrEqual(3);
      expect(bottomRow.length).toBeGreaterThanOrEqual(3);
      for (const h of [...col, ...topRow, ...bottomRow]) {
        expect(rimGap(h, s.sheet)).toBeLessThan(0);
        const p = s.at(h);
        expectNotMeasured(p);
        expect(p.hidden).toBe(true);
        expect(p.hiddenBy).toBe('sheet');
      }
      let measuredNear = 0;
      for (const h of s.truth.holes) {
        const p = s.at(h);
        const gap = rimGap(h, s.sheet);
        if (gap <= 0) {
          expectNotMeasured(p);
          expect(p.hiddenBy).toBe('sheet');
        } else if (gap >= 4 && gap < 20 && rimGap(h, s.board) > 4 && rimGap(h, s.clamp) > 4) {
          // a few mm clear of the sheet (the left edge passes 10 + 20·right mm from the rims of the column at XC − 240)
          expect(p.measured).not.toBeNull();
          measuredNear++;
        }
      }
      expect(measuredNear).toBeGreaterThanOrEqual(3);
      // something lying over a hole: the light board cuts 0.25 D off three rims, the black clamp hides the lower part of two
      for (const h of s.truth.holes.filter((q) => rimGap(q, s.board) <= 0 || rimGap(q, s.clamp) <= 0)) expectNotMeasured(s.at(h));
      const cut = s.truth.holes.filter((q) => Math.abs(q.bed.x - 660) < 1 && rimGap(q, s.board) <= 0);
      expect(cut.length).toBe(3);
      for (const h of cut) {
        expect(s.at(h).hidden).toBe(true);
        expect(s.at(h).hiddenBy).toBe('occluded');
      }
      // nothing hidden is judged: every position in or out was fully in view
      for (const h of s.truth.holes) if (s.at(h).verdict === 'in' || s.at(h).verdict === 'out' || s.at(h).verdict === 'marginal') expect(Math.min(rimGap(h, s.sheet), rimGap(h, s.board), rimGap(h, s.clamp))).toBeGreaterThan(0);
    }, 120_000);
  }
});
