/**
 * The mail's deviation map image: sharp (libvips, an independent decoder) reads the PNG back; the SVG has one
 * mark per position (the report's own) and keeps the bed's +Y (away from the operator) at the top of the image.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { renderDeviationMapPng, renderDeviationMapSvg } from '@/lib/mail/map-image';
import { reportArrowScale } from '@/lib/report/map-scale';
import { MARKS, POSITION_MARKS } from '@/lib/report/palette';
import { arrowScaleWords, MARK_WORD, positionMark } from '@/lib/report/words';
import { buildReport } from '../pdf/report-fixture';

describe('deviation map image', () => {
  it("draws one mark per position, each the report's mark for it, far side of the bed at the top", () => {
    const report = buildReport();
    const svg = renderDeviationMapSvg(report, { widthPx: 800 });
    const marks = [...svg.matchAll(/<g transform="translate\(([\d.]+) ([\d.]+)\)" data-mark="([a-z]+)">/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]), mark: m[3] }));
    expect(marks.length).toBe(report.positions.length + POSITION_MARKS.length); // plus one legend swatch per mark
    const onMap = marks.slice(0, report.positions.length);
    expect(onMap.map((m) => m.mark)).toEqual(report.positions.map(positionMark));
    // the fixture has positions out and not seen: they are drawn as a crossed square and a ring, not as discs
    expect(onMap.filter((m) => m.mark === 'out').length).toBe(report.positions.filter((p) => p.verdict === 'out').length);
    expect(svg).toContain(`fill="${MARKS.out.colour}"`);
    expect(svg).not.toContain('<circle');
    const dogYs = report.positions.map((p, k) => (p.family === 'dog' ? onMap[k]!.y : null)).filter((y): y is number => y !== null);
    const insertYs = report.positions.map((p, k) => (p.family === 'insert' ? onMap[k]!.y : null)).filter((y): y is number => y !== null);
    // The dog row has the largest bed Y, so the smallest image y (SVG y grows downward).
    expect(Math.max(...dogYs)).toBeLessThan(Math.min(...insertYs));
    // the legend names each mark with its count and prints the report's one arrow scale
    expect(svg).toContain(`>${MARK_WORD.missing} 2<`);
    expect(svg).toContain(arrowScaleWords(reportArrowScale(report)));
  });

  it('escapes panel names in the SVG', () => {
    const report = buildReport();
    (report.pattern as unknown as { panels: { id: string }[] }).panels[0]!.id = '<P&1>';
    const svg = renderDeviationMapSvg(report);
    expect(svg).toContain('&lt;P&amp;1&gt;');
    expect(svg).not.toContain('<P&1>');
  });

  it('rasterises to a PNG of the asked width and the bed aspect', async () => {
    const report = buildReport();
    const png = await renderDeviationMapPng(report, { widthPx: 640 });
    const meta = await sharp(png).metadata();
    expect(meta.format).toBe('png');
    expect(meta.width).toBe(640);
    const bed = report.pattern as unknown as { bed: { width: number; height: number } };
    // Drawn height = (640 − 2·10 px padding) × bed aspect, plus padding, a 12 px line above and below the map for
    // the names of the bed's edges, and the legend strip (66 px).
    expect(meta.height).toBe(Math.ceil(((640 - 20) * bed.bed.height) / bed.bed.width + 20 + 24 + 22));
  });
});
