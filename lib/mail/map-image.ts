/**
 * The deviation map as an image for the report mail: an SVG drawn from the report (bed frame mm → image px,
 * +Y away from the operator drawn up, so SVG y = height − …) with the report's own marks (lib/report/palette.ts)
 * and its one arrow scale (lib/report/map-scale.ts), and the same rasterised to PNG with sharp, which every mail
 * reader shows inline.
 */
import sharp from 'sharp';
import type { Report } from '@/lib/geometry/contract';
import { mapGeometry, markRadiusMm, nearestSpacing } from '@/lib/report/map';
import { reportArrowScale } from '@/lib/report/map-scale';
import { MARKS, markSvg, POSITION_MARKS, type Mark } from '@/lib/report/palette';
import { arrowScaleWords, MAP_EDGE_WORDS, MARK_WORD, positionMark, reportCounts } from '@/lib/report/words';
import { escapeHtml } from './html';

const GROUND = '#f7f7f2';

export interface MapImageOptions {
  /** Image width, px (default 640); the height follows the bed's aspect. */
  widthPx?: number;
}

/** SVG text of the deviation map. */
export function renderDeviationMapSvg(report: Report, opts: MapImageOptions = {}): string {
  const g = mapGeometry(report);
  const W = Math.max(200, Math.min(2400, Math.round(opts.widthPx ?? 640)));
  const pad = 10;
  const legendH = 22;
  // a line above the map and one below it for the names of the bed's edges
  const edgeH = 12;
  const top = pad + edgeH;
  const scale = (W - 2 * pad) / g.widthMm;
  const drawH = g.heightMm * scale;
  const H = Math.ceil(drawH + 2 * pad + 2 * edgeH + legendH);
  const X = (xMm: number) => pad + (xMm - g.originX) * scale;
  const Y = (yMm: number) => top + drawH - (yMm - g.originY) * scale;
  const f = (v: number) => v.toFixed(2);
  const exaggeration = reportArrowScale(report);
  const r = Math.max(1, markRadiusMm(g, nearestSpacing(report.positions)) * scale);
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif">`,
    `<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`,
    `<rect x="${f(pad)}" y="${f(top)}" width="${f(g.widthMm * scale)}" height="${f(drawH)}" fill="${GROUND}" stroke="#1a2120" stroke-width="1"/>`,
    `<text x="${f(W / 2)}" y="${f(top - 3)}" font-size="10" text-anchor="middle" fill="#616b69">${escapeHtml(MAP_EDGE_WORDS.back)}</text>`,
    `<text x="${f(W / 2)}" y="${f(top + drawH + 11)}" font-size="10" text-anchor="middle" font-weight="bold" fill="#1a2120">${escapeHtml(MAP_EDGE_WORDS.front)}</text>`,
  ];
  for (const q of g.panels) {
    parts.push(`<rect x="${f(X(q.x))}" y="${f(Y(q.y + q.height))}" width="${f(q.width * scale)}" height="${f(q.height * scale)}" fill="none" stroke="#616b69" stroke-width="0.7"/>`);
    parts.push(`<text x="${f(X(q.x) + 3)}" y="${f(Y(q.y + q.height) + 10)}" font-size="9" fill="#616b69">${escapeHtml(q.id)}</text>`);
  }
  for (const q of report.positions) {
    const mark: Mark = positionMark(q);
    const cx = X(q.nominal.x);
    const cy = Y(q.nominal.y);
    if (q.deviation && q.deviation.r * exaggeration * scale > r * 0.6) {
      const ex = cx + q.deviation.dx * scale * exaggeration;
      const ey = cy - q.deviation.dy * scale * exaggeration;
      parts.push(`<line x1="${f(cx)}" y1="${f(cy)}" x2="${f(ex)}" y2="${f(ey)}" stroke="${MARKS[mark].colour}" stroke-width="1"/>`);
    }
    parts.push(markSvg(mark, cx, cy, r, GROUND));
  }
  const ly = H - 8;
  let lx = pad;
  const counts = reportCounts(report);
  for (const m of POSITION_MARKS) {
    const label = `${MARK_WORD[m]} ${counts[m]}`;
    parts.push(markSvg(m, lx + 4, ly - 3, 3.5, '#ffffff'));
    parts.push(`<text x="${lx + 11}" y="${ly}" font-size="10" fill="#1a2120">${escapeHtml(label)}</text>`);
    lx += 18 + label.length * 5.6;
  }
  parts.push(`<text x="${f(lx)}" y="${ly}" font-size="10" fill="#1a2120">${escapeHtml(arrowScaleWords(exaggeration))}</text>`);
  parts.push('</svg>');
  return parts.join('\n');
}

/** PNG bytes of the deviation map (sharp rasterises the SVG). */
export async function renderDeviationMapPng(report: Report, opts: MapImageOptions = {}): Promise<Buffer> {
  return sharp(Buffer.from(renderDeviationMapSvg(report, opts))).png({ compressionLevel: 9 }).toBuffer();
}

/** PNG bytes of one mark on white, `sizePx` square (the mail's verdict line). */
export async function renderMarkPng(mark: Mark, sizePx = 18): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${sizePx}" height="${sizePx}" viewBox="-10 -10 20 20">${markSvg(mark, 0, 0, 7, '#ffffff')}</svg>`;
  return sharp(Buffer.from(svg)).png({ compressionLevel: 9 }).toBuffer();
}
