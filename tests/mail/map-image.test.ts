/**
 * The mail's deviation map image: sharp (libvips, an independent decoder) reads the PNG back; the SVG has one
 * marker per position and keeps the bed's +Y (away from the operator) at the top of the image.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { renderDeviationMapPng, renderDeviationMapSvg } from '@/lib/mail/map-image';
import { buildReport } from '../pdf/report-fixture';

describe('deviation map image', () => {
  it('draws one marker per position, far side of the bed at the top', () => {
    const report = buildReport();
    const svg = renderDeviationMapSvg(report, { widthPx: 800 });
    const circles = [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => [Number(m[1]), Number(m[2])] as const);
    expect(circles.length).toBe(report.positions.length + 4); // plus the four legend swatches
    const markers = circles.slice(0, report.positions.length);
    const dogYs = report.positions.map((p, k) => (p.family === 'dog' ? markers[k]![1] : null)).filter((y): y is number => y !== null);
    const insertYs = report.positions.map((p, k) => (p.family === 'insert' ? markers[k]![1] : null)).filter((y): y is number => y !== null);
    // The dog row has the largest bed Y, so the smallest image y (SVG y grows downward).
    expect(Math.max(...dogYs)).toBeLessThan(Math.min(...insertYs));
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
    // Drawn height = (640 − 2·10 px padding) × bed aspect, plus padding and the legend strip (42 px).
    expect(meta.height).toBe(Math.ceil(((640 - 20) * bed.bed.height) / bed.bed.width + 20 + 22));
  });
});
