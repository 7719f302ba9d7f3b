/**
 * The report PDF, read back from its bytes: structure per ISO 32000-1 (header `%PDF-` §7.5.2, `%%EOF` at the
 * end §7.5.5), text shown on the pages, and the deviation map's geometry (markers on the bed's lattice, the
 * operator's side at the bottom, one marker per position by verdict colour).
 */
import { PDFDocument } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { presetById } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { renderReportPdf } from '@/lib/pdf/report';
import { headlineUnderVerdict } from '@/lib/report/headline';
import { hexToRgb01, MARKS } from '@/lib/report/palette';
import { reportArrowScale } from '@/lib/report/map-scale';
import { arrowScaleWords, BED_VERDICT_WORD, viewCounts } from '@/lib/report/words';
import { bounds, readPage, type PageContent } from './pdf-reader';
import { buildReport } from './report-fixture';

async function allPages(bytes: Uint8Array): Promise<PageContent[]> {
  const n = (await PDFDocument.load(bytes)).getPageCount();
  return Promise.all(Array.from({ length: n }, (_, k) => readPage(bytes, k)));
}
const textOf = (pages: PageContent[]) => pages.flatMap((p) => p.texts.map((t) => t.text)).join(' ');

const OUT_RGB = hexToRgb01(MARKS.out.colour);
const IN_RGB = hexToRgb01(MARKS.in.colour);
const same = (a: [number, number, number] | null, b: [number, number, number]) => !!a && a.every((v, k) => Math.abs(v - b[k]!) < 1e-3);

describe('report PDF', () => {
  it('renders a full report: verdict, figures, panel moves and the positions out or marginal', async () => {
    const report = buildReport();
    const bytes = await renderReportPdf(report, { workshopName: 'North Bench', bedName: 'Main spoilboard', checkTitle: 'After resurfacing', checkedAt: Date.UTC(2026, 11, 2, 8, 0), comments: [{ author: 'Ada', positionLabel: 'insert D3', body: 'Binds when the clamp is tight.', createdAt: Date.UTC(2026, 11, 2, 9, 0) }] });
    expect(Buffer.from(bytes.subarray(0, 5)).toString('latin1')).toBe('%PDF-');
    expect(Buffer.from(bytes.subarray(bytes.length - 8)).toString('latin1')).toContain('%%EOF');
    const pages = await allPages(bytes);
    const text = textOf(pages);
    expect(text).toContain('Gridproof bed check');
    expect(text).toContain('North Bench');
    expect(text).toContain('Main spoilboard');
    expect(text).toContain('2026-12-02 08:00 UTC');
    expect(text).toContain(BED_VERDICT_WORD[report.summary.verdict]);
    // The headline (wrapped over lines) appears word for word.
    const words = headlineUnderVerdict(report, 'mm').split(' ');
    // the verdict word is the box's heading, not said again at the start of the sentence
    expect(text).not.toContain(`${BED_VERDICT_WORD[report.summary.verdict]}:`);
    expect(words.every((w) => text.includes(w))).toBe(true);
    // Figures: scale 1.00021 is +210 parts per million, (1.00021 − 1) × 1000 mm = +0.21 mm over 1 m; its 1σ 4e-5 is
    // 40 ppm; squareness in degrees with the degree sign on the figure and on its ± (ISO 80000-3)
    expect(text).toContain('Scale along X: +210 ± 40 ppm, +0.21 mm over 1 m');
    expect(text).toContain('Scale along Y: -120 ± 40 ppm, -0.12 mm over 1 m');
    // (0.0123° ± 0.003° to 0.001°)
    expect(text).toContain('Squareness (departure of the X and Y rows from 90°): +0.012° ± 0.003°.');
    // the figures as the report's cards name them
    expect(text).toContain(`RMS off ${report.summary.rmsMm.toFixed(2)} mm`);
    expect(text).toContain(`Measured ${report.positions.filter((p) => p.deviation).length} · Out ${report.positions.filter((p) => p.verdict === 'out').length}`);
    expect(text).toContain('Not seen 2 · Hidden 0');
    // Panel moves, with the contract's unicode minus drawn as '-'.
    expect(text).toContain('move X by -0.12 mm (-0.005 in)');
    // Every position out or marginal is listed by label.
    const flagged = report.positions.filter((p) => p.verdict === 'out' || p.verdict === 'marginal');
    expect(flagged.length).toBeGreaterThanOrEqual(2);
    for (const p of flagged) expect(text).toContain(p.label);
    expect(text).toContain('Binds when the clamp is tight.');
    expect(text).toMatch(/page 1 of \d/);
  });

  it("draws one mark per position on the lattice, the report's own, operator side at the bottom", async () => {
    const report = buildReport();
    const [first] = await allPages(await renderReportPdf(report, { workshopName: 'W' }));
    // Marks are small (a few pt); the verdict bar and map background are not.
    const filled = first!.paths.filter((p) => p.fill && p.fillRgb && (({ minY, maxY }) => maxY - minY < 20)(bounds(p.subpaths.flat())));
    const centre = (p: (typeof filled)[number]) => { const b = bounds(p.subpaths.flat()); return [(b.minX + b.maxX) / 2, (b.minY + b.maxY) / 2] as const; };
    const outMarkers = filled.filter((p) => same(p.fillRgb, OUT_RGB));
    const inMarkers = filled.filter((p) => same(p.fillRgb, IN_RGB));
    const expectIn = report.positions.filter((p) => p.verdict === 'in').length;
    const expectOut = report.positions.filter((p) => p.verdict === 'out').length;
    // Plus one legend swatch per mark, and the fail's mark beside the verdict word.
    expect(report.summary.verdict).toBe('fail');
    expect(outMarkers.length).toBe(expectOut + 2);
    expect(inMarkers.length).toBe(expectIn + 1);
    // shapes, not colour alone: a position out is a square (four straight sides), one in a disc (curves)
    for (const p of outMarkers) expect(p.subpaths[0]!.length).toBe(5);
    for (const p of inMarkers) expect(p.subpaths[0]!.length).not.toBe(5);
    // The inserts sit on a 100 mm lattice: marker centres (legend excluded, it lies below the map) differ by
    // whole multiples of one page pitch along x.
    const legendY = Math.min(...inMarkers.map((p) => centre(p)[1]));
    const xs = [...new Set(inMarkers.map(centre).filter((c) => c[1] > legendY + 1).map((c) => c[0].toFixed(2)))].map(Number).sort((a, b) => a - b);
    const pitch = xs[1]! - xs[0]!;
    for (const x of xs) expect(Math.abs((x - xs[0]!) / pitch - Math.round((x - xs[0]!) / pitch))).toBeLessThan(0.01);
    // +Y (away from the operator) is up the page: the dog row (largest Y) is drawn above every insert.
    const dogs = report.positions.filter((p) => p.family === 'dog' && p.verdict === 'in');
    expect(dogs.length).toBeGreaterThan(0);
    const markerYs = inMarkers.map(centre).filter((c) => c[1] > legendY + 1).map((c) => c[1]);
    const top = Math.max(...markerYs);
    const dogCount = markerYs.filter((y) => Math.abs(y - top) < 0.01).length;
    expect(dogCount).toBe(dogs.length);
  });

  it('writes the panel and seam tables to 0.01 mm, as the web report does', async () => {
    const pages = await allPages(await renderReportPdf(buildReport(), { workshopName: 'W' }));
    const cells = pages.flatMap((p) => p.texts.map((t) => t.text));
    // the fixture's seam P1 / P2: dX 0.117, dY −0.047, off 0.126, ± 0.008 mm → rounded by hand to 0.01 mm
    // (lib/report/units: 0.01 mm on every surface), the minus drawn as '-' in Helvetica
    for (const c of ['+0.12', '-0.05', '0.13', '0.01']) expect(cells).toContain(c);
    // panel P2: dX 0.121, dY −0.049, ± 0.006 mm
    expect(cells.filter((c) => c === '+0.12').length).toBeGreaterThanOrEqual(2);
    for (const raw of ['0.117', '0.126', '0.008', '0.121', '0.006', '+0.117']) expect(cells).not.toContain(raw);
  });

  it('prints lengths in inches when asked', async () => {
    const report = buildReport();
    const text = textOf(await allPages(await renderReportPdf(report, { workshopName: 'W', units: 'in' })));
    // 25.4 mm = 1 in exactly: the largest deviation in inches.
    expect(text).toContain(`Largest ${(report.summary.maxMm / 25.4).toFixed(4)} in`);
    const worst = report.positions.filter((p) => p.verdict === 'out').sort((a, b) => b.deviation!.r - a.deviation!.r)[0]!;
    expect(text).toContain(`${(worst.deviation!.r / 25.4).toFixed(4)} in off`);
    expect(text).toContain('dX in');
  });

  it('flows a large report over several pages and survives text the font cannot show', async () => {
    const report = buildReport({ cols: 60, rows: 40, seed: 3 });
    expect(report.positions.length).toBeGreaterThan(2000);
    const bytes = await renderReportPdf(report, { workshopName: 'Werkstatt → Nord ≈ 🛠', paper: 'letter', maxPositionRows: 150, comments: [{ author: null, positionLabel: null, body: 'x'.repeat(3000), createdAt: 0 }] });
    const pages = await allPages(bytes);
    expect(pages.length).toBeGreaterThan(1);
    for (const p of pages) {
      expect(p.mediaBox[2]).toBeCloseTo(612, 6); // US Letter, 8.5 in × 72
      expect(p.mediaBox[3]).toBeCloseTo(792, 6);
    }
    const text = textOf(pages);
    expect(text).toContain('Werkstatt -> Nord ~ ?');
    expect(text).toContain(`page ${pages.length} of ${pages.length}`);
  });
});

describe('report PDF from the measurement core', () => {
  it('renders the report analyzePoints makes of a synthetic scene', async () => {
    // A preset bed in strips, photographed by the core's own scene generator with panel shifts and one
    // insert pushed 0.9 mm off; the report is whatever analyzePoints concludes.
    const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
    const scene = makeScene({ pattern, seed: 5, panelShiftMm: 0.3, extraDeviation: new Map([[7, [0.9, 0.2]]]) });
    const report = ReportSchema.parse(analyzePoints(scene.points, pattern));
    const pages = await allPages(await renderReportPdf(report, { workshopName: 'North Bench', paper: 'a4' }));
    const text = textOf(pages);
    for (const w of headlineUnderVerdict(report, 'mm').split(' ')) expect(text).toContain(w.replace(/[−]/g, '-'));
    for (const p of report.positions.filter((q) => q.verdict === 'out' || q.verdict === 'marginal')) expect(text).toContain(p.label);
    for (const q of report.panels) expect(text).toContain(q.id);
    for (const p of report.positions.filter((q) => q.verdict === 'missing')) expect(text).toContain(p.label);
    // Both verdicts in plain words: the overall-size line, and every position out or marginal hole to hole listed.
    expect(report.summary.shapeSentence).toBeTruthy();
    for (const w of report.summary.shapeSentence!.split(' ')) expect(text).toContain(w.replace(/[−]/g, '-'));
    expect(text).toContain('Hole to hole');
    const formFlagged = report.positions.filter((q) => q.form?.verdict === 'out' || q.form?.verdict === 'marginal');
    expect(formFlagged.length).toBeGreaterThan(0);
    for (const p of formFlagged) expect(text).toContain(p.label);
  });

  it('draws a second, smaller map hole to hole: each position by its form verdict, with the same arrow scale', async () => {
    // a lattice stretched 0.8 mm per metre along X with one insert pushed 0.9 mm off: positions near the ends
    // marginal on the whole bed, only the pushed insert off hole to hole (an affine placement takes a stretch out)
    const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
    const scene = makeScene({ pattern, seed: 5, scaleX: 1.0008, extraDeviation: new Map([[7, [0.9, 0.2]]]) });
    const report = ReportSchema.parse(analyzePoints(scene.points, pattern));
    const pages = await allPages(await renderReportPdf(report, { workshopName: 'North Bench', paper: 'a4' }));
    const text = textOf(pages);
    expect(text).toContain('Deviation map: whole bed');
    expect(text).toContain('Deviation map: hole to hole');
    // one arrow scale for the check, printed under both maps
    expect(text.split(arrowScaleWords(reportArrowScale(report))).length - 1).toBe(2);
    // the maps: their grounds (large filled rectangles of the map colour), and the filled marks inside each
    const GROUND: [number, number, number] = [0.97, 0.97, 0.95];
    const maps = pages.flatMap((pg, k) => pg.paths.filter((p) => same(p.fillRgb, GROUND)).map((p) => ({ page: k, box: bounds(p.subpaths.flat()) })));
    expect(maps).toHaveLength(2);
    const [bedMap, formMap] = maps as [(typeof maps)[number], (typeof maps)[number]];
    expect(formMap.box.maxY - formMap.box.minY).toBeLessThan(0.7 * (bedMap.box.maxY - bedMap.box.minY));
    const marksIn = (m: (typeof maps)[number], hex: string) => pages[m.page]!.paths.filter((p) => {
      if (!p.fill || !same(p.fillRgb, hexToRgb01(hex))) return false;
      const b = bounds(p.subpaths.flat());
      return b.maxX - b.minX < 20 && b.minX >= m.box.minX && b.maxX <= m.box.maxX && b.minY >= m.box.minY && b.maxY <= m.box.maxY;
    }).length;
    const bed = viewCounts(report, 'bed');
    const form = viewCounts(report, 'form');
    expect(bed.marginal).toBeGreaterThan(10);
    expect(form.marginal).toBe(0);
    for (const m of ['in', 'marginal', 'out'] as const) {
      expect(marksIn(bedMap, MARKS[m].colour), `whole bed ${m}`).toBe(bed[m]);
      expect(marksIn(formMap, MARKS[m].colour), `hole to hole ${m}`).toBe(form[m]);
    }
    // each legend counts its own map's marks
    expect(text).toContain(`Marginal ${bed.marginal} `);
    expect(text).toContain(`Marginal ${form.marginal} `);
  });

  it('lists the measured distances given with the check, with their residuals', async () => {
    const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
    const scene = makeScene({ pattern, seed: 5, centreNoisePx: 0.05 });
    // Nominal 100 mm pitch: insert A1 to insert K1 is ten pitches (the preset's own pattern).
    const report = ReportSchema.parse(analyzePoints(scene.points, pattern, { distances: [{ from: 'insert A1', to: 'insert K1', mm: 1000, sigmaMm: 0.3 }] }));
    const text = textOf(await allPages(await renderReportPdf(report, { workshopName: 'North Bench', paper: 'a4' })));
    const d = report.distances![0]!;
    expect(text).toContain('Measured distance insert A1 to insert K1');
    expect(text).toContain(`after the fit ${d.fittedMm!.toFixed(2)} mm`);
    expect(text).toContain(`${Math.abs(d.residualSigmas!).toFixed(1)} times its uncertainty`);
  });
  it('says in the verdict box that the figures carry the photo\'s problems, and nothing when it had none', async () => {
    const base = buildReport();
    const quality = {
      issues: [{ code: 'overexposed' as const, message: 'Over-exposed: the white is burnt out.', advice: 'Switch off the flash.' }],
      predicted: { positionMm: 0.04, scalePpm: 150 },
      measured: { widthPx: 4000, heightPx: 3000, edgeSpreadPx: 2, defocusSigmaPx: 0.7, motion: null, targetSidePx: 600, holeDiameterPx: 20, tiltDeg: 4, clipped: null, whiteLevel: 255, holesSampled: 30 },
      timeMs: 120,
    };
    const text = textOf(await allPages(await renderReportPdf({ ...base, photo: { quality } }, { workshopName: 'North Bench' })));
    expect(text).toContain('over-exposure');
    expect(text).toContain('These figures carry it;');
    const clean = textOf(await allPages(await renderReportPdf({ ...base, photo: { quality: { ...quality, issues: [] } } }, { workshopName: 'North Bench' })));
    expect(clean).not.toContain('These figures carry');
    // a shared report has no photo; the note is passed in words
    const shared = textOf(await allPages(await renderReportPdf(base, { workshopName: 'Shared report', photoNote: 'Measured from a photo with a problem: camera shake. These figures carry it; take a better photo.' })));
    expect(shared).toContain('camera shake');
  });
});
