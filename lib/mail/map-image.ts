/**
 * The deviation map as an image for the report mail: an SVG drawn from the report (bed frame mm → image px,
 * +Y away from the operator drawn up, so SVG y = height − …), and the same rasterised to PNG with sharp, which
 * every mail reader shows inline.
 */
import sharp from 'sharp';
import type { Report } from '@/lib/geometry/contract';
import { mapGeometry, nearestSpacing, niceFactor, VERDICT_RGB } from '@/lib/pdf/map';
import { escapeHtml } from './html';

const hex = (c: [number, number, number]) => `#${c.map((v) => Math.round(v * 255).toString(16).padStart(2, '0')).join('')}`;

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
  const scale = (W - 2 * pad) / g.widthMm;
  const drawH = g.heightMm * scale;
  const H = Math.ceil(drawH + 2 * pad + legendH);
  const X = (xMm: number) => pad + (xMm - g.originX) * scale;
  const Y = (yMm: number) => pad + drawH - (yMm - g.originY) * scale;
  const f = (v: number) => v.toFixed(2);
  const matched = report.positions.filter((q) => q.deviation);
  const maxR = Math.max(0, ...matched.map((q) => q.deviation!.r));
  const spacingPx = nearestSpacing(report.positions) * scale;
  const exaggeration = maxR > 0 ? niceFactor((0.8 * spacingPx) / (maxR * scale)) : 1;
  const dot = Math.max(1, Math.min(4, spacingPx * 0.18));
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif">`,
    `<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`,
    `<rect x="${f(pad)}" y="${f(pad)}" width="${f(g.widthMm * scale)}" height="${f(drawH)}" fill="#f7f7f2" stroke="#1a2120" stroke-width="1"/>`,
  ];
  for (const q of g.panels) {
    parts.push(`<rect x="${f(X(q.x))}" y="${f(Y(q.y + q.height))}" width="${f(q.width * scale)}" height="${f(q.height * scale)}" fill="none" stroke="#616b69" stroke-width="0.7"/>`);
    parts.push(`<text x="${f(X(q.x) + 3)}" y="${f(Y(q.y + q.height) + 10)}" font-size="9" fill="#616b69">${escapeHtml(q.id)}</text>`);
  }
  for (const q of report.positions) {
    const colour = hex(VERDICT_RGB[q.verdict]);
    const cx = X(q.nominal.x);
    const cy = Y(q.nominal.y);
    if (q.verdict === 'missing') {
      parts.push(`<circle cx="${f(cx)}" cy="${f(cy)}" r="${f(dot)}" fill="none" stroke="${colour}" stroke-width="0.8"/>`);
      continue;
    }
    parts.push(`<circle cx="${f(cx)}" cy="${f(cy)}" r="${f(dot)}" fill="${colour}"/>`);
    if (q.deviation && q.deviation.r > 0) {
      const ex = cx + q.deviation.dx * scale * exaggeration;
      const ey = cy - q.deviation.dy * scale * exaggeration;
      parts.push(`<line x1="${f(cx)}" y1="${f(cy)}" x2="${f(ex)}" y2="${f(ey)}" stroke="${colour}" stroke-width="1"/>`);
    }
  }
  const ly = H - 8;
  let lx = pad;
  for (const v of ['in', 'marginal', 'out', 'missing'] as const) {
    const colour = hex(VERDICT_RGB[v]);
    parts.push(v === 'missing'
      ? `<circle cx="${lx + 4}" cy="${ly - 3}" r="3.5" fill="none" stroke="${colour}"/>`
      : `<circle cx="${lx + 4}" cy="${ly - 3}" r="3.5" fill="${colour}"/>`);
    parts.push(`<text x="${lx + 11}" y="${ly}" font-size="10" fill="#1a2120">${v}</text>`);
    lx += 64;
  }
  parts.push(`<text x="${lx}" y="${ly}" font-size="10" fill="#1a2120">arrows ${exaggeration}× · operator side at the bottom</text>`);
  parts.push('</svg>');
  return parts.join('\n');
}

/** PNG bytes of the deviation map (sharp rasterises the SVG). */
export async function renderDeviationMapPng(report: Report, opts: MapImageOptions = {}): Promise<Buffer> {
  return sharp(Buffer.from(renderDeviationMapSvg(report, opts))).png({ compressionLevel: 9 }).toBuffer();
}
