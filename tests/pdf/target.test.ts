/**
 * The printable target measured from the PDF bytes. Units: 1 in = 25.4 mm exactly (international inch,
 * 1959); PDF default user space has 72 units per inch, 1 pt = 1/72 in (ISO 32000-1 §8.3.2.3), unless a page
 * sets UserUnit (ISO 32000-1 Table 30). Paper: A4 = 210 × 297 mm and A3 = 297 × 420 mm (ISO 216); US Letter =
 * 8.5 × 11 in and Tabloid = 11 × 17 in (ANSI/ASME Y14.1). Expected values below are computed from those definitions and the stated sizes, never read from the
 * generator; the geometry is read by interpreting the page's content stream (tests/pdf/pdf-reader.ts) and,
 * when poppler's pdftoppm is installed, by rasterising the page and measuring pixels.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PDFDocument, PDFName, StandardFonts } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { renderTargetPdf } from '@/lib/pdf/target';
import { paperMarginMm, targetInkAt } from '@/lib/vision/target';
import { blackAt, bounds, readPage, type PageContent, type Pt } from './pdf-reader';

const PT_PER_IN = 72; // ISO 32000-1
const MM_PER_IN = 25.4; // exact by definition
const ptOfMm = (mm: number) => (mm / MM_PER_IN) * PT_PER_IN;

const SMALL_PAPERS = [
  { paper: 'a4', widthPt: ptOfMm(210), heightPt: ptOfMm(297) },
  { paper: 'letter', widthPt: 8.5 * PT_PER_IN, heightPt: 11 * PT_PER_IN },
] as const;
const LARGE_PAPERS = [
  { paper: 'a3', widthPt: ptOfMm(297), heightPt: ptOfMm(420) },
  { paper: 'tabloid', widthPt: 11 * PT_PER_IN, heightPt: 17 * PT_PER_IN },
] as const;
const SIZES = [
  { size: '100mm', statedPt: ptOfMm(100), label: '100 mm', papers: SMALL_PAPERS },
  { size: '150mm', statedPt: ptOfMm(150), label: '150 mm', papers: SMALL_PAPERS },
  { size: '4in', statedPt: 4 * PT_PER_IN, label: '4 in', papers: SMALL_PAPERS },
  { size: '250mm', statedPt: ptOfMm(250), label: '250 mm', papers: LARGE_PAPERS },
] as const;

/** The square frame: the black filled path with the largest outline, and that outline's bounds. */
function findSquare(content: PageContent) {
  const filled = content.paths.filter((p) => p.fill && p.fillGrey === 0);
  let best: { path: (typeof filled)[number]; b: ReturnType<typeof bounds> } | null = null;
  for (const path of filled) {
    const b = bounds(path.subpaths.flat());
    if (!best || (b.maxX - b.minX) * (b.maxY - b.minY) > (best.b.maxX - best.b.minX) * (best.b.maxY - best.b.minY)) best = { path, b };
  }
  if (!best) throw new Error('no black filled path on the page');
  return best;
}

function pdftoppmAvailable(): boolean {
  try {
    execFileSync('pdftoppm', ['-v'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** Renders a window of the page at `dpi` in grey (poppler) and returns its rows. */
function rasterWindow(pdf: Uint8Array, dpi: number, x: number, y: number, w: number, h: number): number[][] {
  const dir = mkdtempSync(join(tmpdir(), 'gridproof-ppm-'));
  try {
    writeFileSync(join(dir, 'p.pdf'), pdf);
    execFileSync('pdftoppm', ['-r', String(dpi), '-gray', '-singlefile', '-x', String(x), '-y', String(y), '-W', String(w), '-H', String(h), join(dir, 'p.pdf'), join(dir, 'out')]);
    const buf = readFileSync(join(dir, 'out.pgm'));
    // Binary PGM (P5): magic, width, height, maxval, one whitespace, then the samples (Netpbm format).
    const header = buf.subarray(0, 64).toString('latin1').match(/^P5\s+(\d+)\s+(\d+)\s+(\d+)\s/);
    if (!header) throw new Error('not a binary PGM');
    const [width, height] = [Number(header[1]), Number(header[2])];
    const data = buf.subarray(header[0].length);
    return Array.from({ length: height }, (_, r) => Array.from(data.subarray(r * width, (r + 1) * width)));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Sub-pixel positions (px from the window's left edge) where a profile first and last crosses mid-grey. */
function outerEdgesPx(profile: number[]): [number, number] {
  const mid = 127.5;
  const first = profile.findIndex((v) => v < mid);
  let last = -1;
  for (let k = profile.length - 1; k >= 0; k -= 1) if (profile[k]! < mid) { last = k; break; }
  if (first <= 0 || last < 0 || last >= profile.length - 1) throw new Error('edge not inside the window');
  // Pixel k covers [k, k+1); its sample stands for the centre k + 0.5. Linear interpolation between centres.
  const a = profile[first - 1]!, b = profile[first]!;
  const left = first - 1 + 0.5 + (a - mid) / (a - b);
  const c = profile[last]!, d = profile[last + 1]!;
  const right = last + 0.5 + (c - mid) / (c - d);
  return [left, right];
}

describe('printable target PDF', () => {
  for (const { size, statedPt, label, papers } of SIZES) {
    for (const { paper, widthPt, heightPt } of papers) {
      it(`prints the ${label} square at its stated size on ${paper}`, async () => {
        const pdf = await renderTargetPdf({ size, paper });
        const content = await readPage(pdf);
        // The page is the paper, in plain points.
        expect(content.userUnit).toBeNull();
        expect(content.mediaBox[0]).toBe(0);
        expect(content.mediaBox[1]).toBe(0);
        expect(Math.abs(content.mediaBox[2] - widthPt)).toBeLessThan(0.01);
        expect(Math.abs(content.mediaBox[3] - heightPt)).toBeLessThan(0.01);

        const { b } = findSquare(content);
        const w = b.maxX - b.minX;
        const h = b.maxY - b.minY;
        expect(Math.abs(w - statedPt)).toBeLessThan(0.1);
        expect(Math.abs(h - statedPt)).toBeLessThan(0.1);

        // Probe the fill itself: 0.05 pt inside each outer edge is black, 0.05 pt outside is paper.
        const cx = (b.minX + b.maxX) / 2;
        const cy = (b.minY + b.maxY) / 2;
        const e = 0.05;
        for (const [inside, outside] of [
          [[b.minX + e, cy], [b.minX - e, cy]],
          [[b.maxX - e, cy], [b.maxX + e, cy]],
          [[cx, b.minY + e], [cx, b.minY - e]],
          [[cx, b.maxY - e], [cx, b.maxY + e]],
        ] as [Pt, Pt][]) {
          expect(blackAt(content, inside)).toBe(true);
          expect(blackAt(content, outside)).toBe(false);
        }
        expect(blackAt(content, [cx, cy])).toBe(false);

        // Print and detection agree: the detector's ink model, with corner 0 (next to the mark) at the
        // square's bottom-left, matches what the page paints on a grid across the square.
        const sideMm = (w / PT_PER_IN) * MM_PER_IN;
        let compared = 0;
        for (let i = 0; i <= 60; i += 1) {
          for (let j = 0; j <= 60; j += 1) {
            const xMm = (i / 60) * sideMm;
            const yMm = (j / 60) * sideMm;
            // Skip points within 0.3 mm of an ink boundary, where rounding may flip either model.
            const near = [[0.3, 0], [-0.3, 0], [0, 0.3], [0, -0.3]].some(([dx, dy]) => targetInkAt(xMm + dx!, yMm + dy!, sideMm) !== targetInkAt(xMm, yMm, sideMm));
            if (near) continue;
            compared += 1;
            expect(blackAt(content, [b.minX + ptOfMm(xMm), b.minY + ptOfMm(yMm)])).toBe(targetInkAt(xMm, yMm, sideMm));
          }
        }
        expect(compared).toBeGreaterThan(2000);
      });
    }
  }

  it('keeps the white margin around the frame clear of text and ruler, and everything on the page', async () => {
    const scratch = await PDFDocument.create();
    const metrics = { Helvetica: await scratch.embedFont(StandardFonts.Helvetica), 'Helvetica-Bold': await scratch.embedFont(StandardFonts.HelveticaBold) };
    for (const { size, papers } of SIZES) {
      for (const { paper, widthPt, heightPt } of papers) {
        const content = await readPage(await renderTargetPdf({ size, paper }));
        const sq = findSquare(content);
        const m = ptOfMm(paperMarginMm(((sq.b.maxX - sq.b.minX) / PT_PER_IN) * MM_PER_IN));
        // The white margin is paper: where the page is narrower than square and margin, the sheet's edge is its end.
        expect(sq.b.minX - m).toBeGreaterThanOrEqual(-0.01);
        expect(sq.b.maxX + m).toBeLessThanOrEqual(widthPt + 0.01);
        const zone = { minX: sq.b.minX - m, minY: sq.b.minY - m, maxX: sq.b.maxX + m, maxY: sq.b.maxY + m };
        const overlaps = (r: { minX: number; minY: number; maxX: number; maxY: number }) => r.minX < zone.maxX && r.maxX > zone.minX && r.minY < zone.maxY && r.maxY > zone.minY;
        const inside = (r: { minX: number; minY: number; maxX: number; maxY: number }) => r.minX >= sq.b.minX && r.maxX <= sq.b.maxX && r.minY >= sq.b.minY && r.maxY <= sq.b.maxY;
        for (const p of content.paths) {
          const r = bounds(p.subpaths.flat());
          if (p === sq.path || inside(r)) continue; // the frame and the mark inside it
          expect(overlaps(r)).toBe(false);
        }
        for (const t of content.texts) {
          // Width by the standard Helvetica AFM metrics of the face named in the page resources; descenders
          // reach about 0.22 em below the baseline, ascenders under 1 em above (font metrics, from memory).
          const face = metrics[t.baseFont as keyof typeof metrics];
          expect(face).toBeDefined();
          const r = { minX: t.origin[0], minY: t.origin[1] - 0.25 * t.size, maxX: t.origin[0] + face.widthOfTextAtSize(t.text, t.size), maxY: t.origin[1] + t.size };
          expect(overlaps(r)).toBe(false);
          // Printers leave about 4-5 mm unprinted at the sheet's edges (common practice): keep 5 mm.
          expect(r.minX).toBeGreaterThanOrEqual(ptOfMm(5));
          expect(r.minY).toBeGreaterThanOrEqual(ptOfMm(5));
          expect(r.maxX).toBeLessThanOrEqual(widthPt - ptOfMm(5));
          expect(r.maxY).toBeLessThanOrEqual(heightPt - ptOfMm(5));
        }
      }
    }
  });

  it('has one orientation mark, next to one corner only', async () => {
    const content = await readPage(await renderTargetPdf({ size: '150mm', paper: 'a4' }));
    const sq = findSquare(content);
    const s = sq.b.maxX - sq.b.minX;
    const marks = content.paths.filter((p) => p !== sq.path && p.fill && p.fillGrey === 0).map((p) => bounds(p.subpaths.flat()))
      .filter((r) => r.minX > sq.b.minX && r.maxX < sq.b.maxX && r.minY > sq.b.minY && r.maxY < sq.b.maxY);
    expect(marks).toHaveLength(1);
    const mc: Pt = [(marks[0]!.minX + marks[0]!.maxX) / 2, (marks[0]!.minY + marks[0]!.maxY) / 2];
    const corners: Pt[] = [[sq.b.minX, sq.b.minY], [sq.b.maxX, sq.b.minY], [sq.b.maxX, sq.b.maxY], [sq.b.minX, sq.b.maxY]];
    const d = corners.map((c) => Math.hypot(c[0] - mc[0], c[1] - mc[1])).sort((a, b) => a - b);
    // Unambiguous: the nearest corner is much nearer than the next (a turn of the sheet is always detectable).
    expect(d[1]! - d[0]!).toBeGreaterThan(0.2 * s);
  });

  it('carries a check ruler with millimetre and sixteenth-inch ticks at their true pitch', async () => {
    for (const { size, papers } of SIZES) {
      const content = await readPage(await renderTargetPdf({ size, paper: papers[0].paper === 'a4' ? 'letter' : 'tabloid' }));
      const strokes = content.paths.filter((p) => p.stroke && !p.fill).map((p) => p.subpaths[0]!);
      const horizontal = strokes.filter((s) => Math.abs(s[0]![1] - s[s.length - 1]![1]) < 1e-6 && Math.abs(s[0]![0] - s[s.length - 1]![0]) > 100);
      const vertical = strokes.filter((s) => Math.abs(s[0]![0] - s[s.length - 1]![0]) < 1e-6);
      expect(horizontal.length).toBe(2);
      const scales: { pitch: number; span: number }[] = [];
      for (const base of horizontal) {
        const y = base[0]![1];
        const xs = vertical.filter((s) => s.some((p) => Math.abs(p[1] - y) < 1e-6)).map((s) => s[0]![0]).sort((a, b) => a - b);
        const steps = xs.slice(1).map((x, k) => x - xs[k]!);
        const pitch = steps[0]!;
        for (const st of steps) expect(Math.abs(st - pitch)).toBeLessThan(0.001);
        scales.push({ pitch, span: xs[xs.length - 1]! - xs[0]! });
      }
      // One scale at 1 mm = 72/25.4 pt, the other at 1/16 in = 4.5 pt.
      const [mm, inch] = [...scales].sort((a, b) => a.pitch - b.pitch);
      expect(Math.abs(mm!.pitch - PT_PER_IN / MM_PER_IN)).toBeLessThan(0.001);
      expect(Math.abs(inch!.pitch - PT_PER_IN / 16)).toBeLessThan(0.001);
      // Long enough to check a print against a rule: at least 100 mm and 4 in.
      expect(mm!.span).toBeGreaterThanOrEqual(ptOfMm(100) - 0.001);
      expect(inch!.span).toBeGreaterThanOrEqual(4 * PT_PER_IN - 0.001);
    }
  });

  it('names the 250 mm target and its large paper on the page', async () => {
    for (const [paper, name] of [['a3', 'A3'], ['tabloid', 'US Tabloid']] as const) {
      const all = (await readPage(await renderTargetPdf({ size: '250mm', paper }))).texts.map((t) => t.text).join(' ');
      // 250 mm / 25.4 mm per in = 9.843 in
      expect(all).toContain(`250 mm (9.843 in). Paper: ${name}.`);
    }
  });

  it('tells how to print and measure, and gives the safety caution', async () => {
    const pdf = await renderTargetPdf({ size: '4in', paper: 'a4' });
    const content = await readPage(pdf);
    const all = content.texts.map((t) => t.text).join(' ');
    for (const phrase of ['100 %', 'Actual size', 'Fit to page', 'Measure the outer edge', 'Enter the size you measured', '4 in (101.6 mm)', 'switch the machine off', 'spindle has stopped', "machine maker's manual"]) {
      expect(all).toContain(phrase);
    }
    // Viewers are asked not to scale when printing (ViewerPreferences /PrintScaling /None, ISO 32000-1 Table 150).
    const doc = await PDFDocument.load(pdf);
    const prefs = doc.catalog.lookup(PDFName.of('ViewerPreferences'));
    expect(String(prefs)).toContain('/PrintScaling /None');
  });

  it.skipIf(!pdftoppmAvailable())('rasterised by poppler, the square measures its stated size within 0.1 pt', async () => {
    const dpi = 1440; // 1 px = 0.05 pt
    for (const { size, statedPt, papers } of SIZES) {
      const pdf = await renderTargetPdf({ size, paper: papers[0].paper });
      const { b } = findSquare(await readPage(pdf)); // only to aim the windows; the measure is the pixels'
      const pageH = papers[0].heightPt;
      const toPx = (pt: number) => Math.round((pt * dpi) / PT_PER_IN);
      const pad = 20;
      // A horizontal strip through the middle, then a vertical one.
      const hx = toPx(b.minX - pad);
      const hy = toPx(pageH - (b.minY + b.maxY) / 2);
      const rows = rasterWindow(pdf, dpi, hx, hy, toPx(b.maxX - b.minX + 2 * pad), 3);
      const profileH = rows[0]!.map((_, k) => rows.reduce((s, r) => s + r[k]!, 0) / rows.length);
      const [l, r] = outerEdgesPx(profileH);
      const vx = toPx((b.minX + b.maxX) / 2);
      const vy = toPx(pageH - b.maxY - pad);
      const cols = rasterWindow(pdf, dpi, vx, vy, 3, toPx(b.maxY - b.minY + 2 * pad));
      const profileV = cols.map((row) => row.reduce((s, v) => s + v, 0) / row.length);
      const [t, u] = outerEdgesPx(profileV);
      const widthPt = ((r - l) * PT_PER_IN) / dpi;
      const heightPt = ((u - t) * PT_PER_IN) / dpi;
      expect(Math.abs(widthPt - statedPt)).toBeLessThan(0.1);
      expect(Math.abs(heightPt - statedPt)).toBeLessThan(0.1);
    }
  });
});

describe('printable target options', () => {
  it('refuses sizes and papers it does not print', async () => {
    await expect(renderTargetPdf({ size: '120mm' as never, paper: 'a4' })).rejects.toThrow();
    await expect(renderTargetPdf({ size: '150mm', paper: 'a5' as never })).rejects.toThrow();
    // a 250 mm square with its margin (310 mm) does not fit across A4 (210 mm) or Letter (215.9 mm)
    await expect(renderTargetPdf({ size: '250mm', paper: 'a4' })).rejects.toThrow(/A3 or Tabloid/);
    await expect(renderTargetPdf({ size: '250mm', paper: 'letter' })).rejects.toThrow(/A3 or Tabloid/);
    await expect(renderTargetPdf({ size: '150mm', paper: 'a3' })).rejects.toThrow();
  });
});
