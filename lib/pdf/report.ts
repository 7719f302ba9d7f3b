/**
 * The report of a check as a PDF (pdf-lib, standard Helvetica): verdict sentence, summary and lattice figures,
 * a deviation map drawn with vectors and the report's own marks (lib/report/palette.ts), its arrow scale the one of
 * lib/report/map-scale.ts, and a smaller second map hole to hole (the positions' form verdicts, same arrow scale) when
 * the report has them, the panel table with the moves that correct them, the table of positions
 * out or marginal, the method note (lib/report/method-note.ts, as on every surface) and comments.
 *
 * Frames: the report is in the bed frame (mm, origin front-left, +X right, +Y away from the operator); the map
 * keeps that orientation on the page (PDF points, origin bottom-left, +y up), so the operator's side is at the
 * bottom. Lengths print in mm, or in inches when `units` is 'in'.
 */
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import { type Report, type Verdict } from '@/lib/geometry/contract';
import { distanceSentence } from '@/lib/report/distances';
import { bandRadiusMm } from '@/lib/geometry/band';
import { headlineUnderVerdict, shapeLine } from '@/lib/report/headline';
import { mapGeometry, markRadiusMm, nearestSpacing } from '@/lib/report/map';
import { reportArrowScale } from '@/lib/report/map-scale';
import { hexToRgb01, MARKS, markLayers, POSITION_MARKS, type Mark } from '@/lib/report/palette';
import { formatAngle, formatLength, formatPpm, scaleOver } from '@/lib/report/units';
import { arrowScaleWords, BED_VERDICT_MARK, MAP_EDGE_WORDS, BED_VERDICT_WORD, figureCards, hasFormView, MAP_VIEW_MEANING, MAP_VIEW_WORD, MARK_WORD, outOfSightWords, positionMark, reportCounts, viewCounts, viewDeviation, viewMark, type MapView } from '@/lib/report/words';
import { drawable, wrapText } from './text';
import { photoNote } from '@/lib/report/photo-note';
import { methodNote, methodNoteLines, type FitFamily } from '@/lib/report/method-note';
import { mmToPt, paperSizePt, type Paper } from './units';
import { formatUtc } from '@/lib/dates';

export interface ReportPdfComment {
  author: string | null;
  positionLabel: string | null;
  body: string;
  /** ms since the Unix epoch, or a Date. */
  createdAt: number | Date;
}

export interface ReportPdfOptions {
  paper?: Paper;
  workshopName: string;
  bedName?: string | null;
  checkTitle?: string | null;
  /** When the photo was checked (ms since the Unix epoch, or a Date). */
  checkedAt?: number | Date | null;
  /** Display units for lengths (the report itself is in mm). */
  units?: 'mm' | 'in';
  comments?: ReportPdfComment[];
  /** Most rows in the table of positions out or marginal (default 400); the rest are counted. */
  maxPositionRows?: number;
  /** The photo's problems in words, for a report that no longer carries its photo (a shared one); else from report.photo. */
  photoNote?: string | null;
  /**
   * The pattern's families for the method note (lib/report/method-note.ts); null when the pattern is gone. Absent:
   * the note says only how the fit tables were checked and how the bands are drawn.
   */
  fits?: FitFamily[] | null;
}

const MAP_GROUND = rgb(0.97, 0.97, 0.95);
const INK = rgb(0.1, 0.13, 0.12);
const MUTED = rgb(0.38, 0.42, 0.41);
const RULE = rgb(0.8, 0.83, 0.82);

/** Page-flowing writer: a cursor from the top, new pages as needed. */
class Flow {
  page!: PDFPage;
  y = 0;
  readonly pages: PDFPage[] = [];
  readonly width: number;
  readonly height: number;
  readonly margin = mmToPt(15);
  constructor(readonly doc: PDFDocument, paper: Paper, readonly regular: PDFFont, readonly bold: PDFFont) {
    [this.width, this.height] = paperSizePt(paper);
    this.newPage();
  }
  get left() { return this.margin; }
  get right() { return this.width - this.margin; }
  get textWidth() { return this.width - 2 * this.margin; }
  newPage() {
    this.page = this.doc.addPage([this.width, this.height]);
    this.pages.push(this.page);
    this.y = this.height - this.margin;
  }
  ensure(h: number) {
    if (this.y - h < this.margin + 14) this.newPage();
  }
  text(s: string, opts: { x?: number; size?: number; font?: PDFFont; color?: RGB } = {}) {
    const font = opts.font ?? this.regular;
    this.page.drawText(drawable(font, s), { x: opts.x ?? this.left, y: this.y, size: opts.size ?? 9, font, color: opts.color ?? INK });
  }
  paragraph(s: string, opts: { size?: number; font?: PDFFont; color?: RGB; indent?: number; width?: number } = {}) {
    const size = opts.size ?? 9;
    const font = opts.font ?? this.regular;
    for (const line of wrapText(font, s, size, (opts.width ?? this.textWidth) - (opts.indent ?? 0))) {
      this.ensure(size * 1.35);
      this.y -= size * 1.35;
      this.text(line, { x: this.left + (opts.indent ?? 0), size, font, color: opts.color });
    }
  }
  heading(s: string) {
    this.ensure(40);
    this.y -= 18;
    this.text(s, { size: 12, font: this.bold });
    this.y -= 4;
    this.page.drawLine({ start: { x: this.left, y: this.y }, end: { x: this.right, y: this.y }, thickness: 0.5, color: RULE });
  }
}

interface Column {
  title: string;
  width: number;
  align?: 'left' | 'right';
  wrap?: boolean;
}

function table(f: Flow, columns: Column[], rows: string[][], size = 8) {
  const lineH = size * 1.3;
  const total = columns.reduce((s, c) => s + c.width, 0);
  const scale = f.textWidth / total;
  const widths = columns.map((c) => c.width * scale);
  const drawRow = (cells: string[], font: PDFFont, color: RGB) => {
    const wrapped = cells.map((c, k) => (columns[k]!.wrap ? wrapText(font, c, size, widths[k]! - 4) : [drawable(font, c)]));
    const lines = Math.max(...wrapped.map((w) => w.length));
    f.ensure(lines * lineH + 3);
    let x = f.left;
    wrapped.forEach((ls, k) => {
      ls.forEach((line, j) => {
        const w = font.widthOfTextAtSize(line, size);
        const tx = columns[k]!.align === 'right' ? x + widths[k]! - 4 - w : x;
        f.page.drawText(line, { x: tx, y: f.y - (j + 1) * lineH, size, font, color });
      });
      x += widths[k]!;
    });
    f.y -= lines * lineH + 3;
    f.page.drawLine({ start: { x: f.left, y: f.y + 1 }, end: { x: f.right, y: f.y + 1 }, thickness: 0.25, color: RULE });
  };
  drawRow(columns.map((c) => c.title), f.bold, MUTED);
  for (const r of rows) {
    // Repeat the header at the top of a new page.
    const before = f.pages.length;
    f.ensure(lineH * 2);
    if (f.pages.length !== before) drawRow(columns.map((c) => c.title), f.bold, MUTED);
    drawRow(r, f.regular, INK);
  }
}

/** The mark at (x, y) pt with radius r pt, from its layers (SVG y-down path data; drawSvgPath turns it onto the page). */
function drawMark(page: PDFPage, mark: Mark, x: number, y: number, r: number, ground: RGB) {
  const colour = rgb(...hexToRgb01(MARKS[mark].colour));
  const paint = (p: 'mark' | 'ground' | null) => (p === 'mark' ? colour : p === 'ground' ? ground : undefined);
  for (const l of markLayers(mark, r)) {
    page.drawSvgPath(l.d, { x, y, color: paint(l.fill), ...(l.stroke ? { borderColor: paint(l.stroke), borderWidth: l.strokeWidth } : {}) });
  }
}

/** Map scale (pt per mm of bed) in a box the text's width and at most `maxHeightPt` high. */
function mapScale(f: Flow, report: Report, maxHeightPt: number): number {
  const g = mapGeometry(report);
  return Math.min(f.textWidth / g.widthMm, (maxHeightPt - 24) / g.heightMm);
}

/** The deviation map of `view` in a box at most `maxHeightPt` high, with its legend (the view's counts) and arrow scale. */
function drawMap(f: Flow, report: Report, exaggeration: number, view: MapView, maxHeightPt: number) {
  const g = mapGeometry(report);
  const boxW = f.textWidth;
  const scale = mapScale(f, report, maxHeightPt);
  const drawW = g.widthMm * scale;
  const drawH = g.heightMm * scale;
  // room above the map for the name of the bed's back edge
  f.ensure(drawH + 46);
  const x0 = f.left + (boxW - drawW) / 2;
  const y0 = f.y - 14 - drawH;
  const px = (xMm: number) => x0 + (xMm - g.originX) * scale;
  const py = (yMm: number) => y0 + (yMm - g.originY) * scale;
  const page = f.page;
  page.drawRectangle({ x: x0, y: y0, width: drawW, height: drawH, borderColor: INK, borderWidth: 0.6, color: MAP_GROUND });
  for (const q of g.panels) {
    page.drawRectangle({ x: px(q.x), y: py(q.y), width: q.width * scale, height: q.height * scale, borderColor: MUTED, borderWidth: 0.4 });
    page.drawText(drawable(f.regular, q.id), { x: px(q.x) + 2, y: py(q.y + q.height) - 7, size: 6, font: f.regular, color: MUTED });
  }
  const spacing = nearestSpacing(report.positions);
  const r = Math.max(0.8, markRadiusMm(g, spacing) * scale);
  for (const q of report.positions) {
    const cx = px(q.nominal.x);
    const cy = py(q.nominal.y);
    const mark = viewMark(q, view);
    const d = viewDeviation(q, view);
    if (d && d.r * exaggeration * scale > r * 0.6) {
      const colour = rgb(...hexToRgb01(MARKS[mark].colour));
      const ex = cx + d.dx * scale * exaggeration;
      const ey = cy + d.dy * scale * exaggeration;
      page.drawLine({ start: { x: cx, y: cy }, end: { x: ex, y: ey }, thickness: 0.6, color: colour });
      // Arrow head: two short strokes at ±25° from the shaft.
      const len = Math.hypot(ex - cx, ey - cy);
      if (len > 3) {
        const ux = (ex - cx) / len;
        const uy = (ey - cy) / len;
        const hl = Math.min(3, len * 0.35);
        for (const s of [1, -1]) {
          const c = Math.cos((25 * Math.PI) / 180);
          const sn = s * Math.sin((25 * Math.PI) / 180);
          page.drawLine({ start: { x: ex, y: ey }, end: { x: ex - hl * (ux * c - uy * sn), y: ey - hl * (uy * c + ux * sn) }, thickness: 0.6, color: colour });
        }
      }
    }
    drawMark(page, mark, cx, cy, r, MAP_GROUND);
  }
  // the bed's edges named as on every map: the back above it, the front (the operator's side) below
  const edge = (words: string, y: number) => {
    const s = drawable(f.regular, words);
    page.drawText(s, { x: x0 + (drawW - f.regular.widthOfTextAtSize(s, 6.5)) / 2, y, size: 6.5, font: f.regular, color: MUTED });
  };
  edge(MAP_EDGE_WORDS.back, y0 + drawH + 2);
  edge(MAP_EDGE_WORDS.front, y0 - 9);
  f.y = y0 - 12;
  // Legend: every mark a position can have, its name and count, then the arrow scale.
  f.y -= 10;
  const counts = viewCounts(report, view);
  let lx = f.left;
  for (const m of POSITION_MARKS) {
    drawMark(page, m, lx + 3.5, f.y + 3, 3, rgb(1, 1, 1));
    const label = `${MARK_WORD[m]} ${counts[m]}`;
    page.drawText(label, { x: lx + 10, y: f.y, size: 7.5, font: f.regular, color: INK });
    lx += 16 + f.regular.widthOfTextAtSize(label, 7.5);
  }
  page.drawText(drawable(f.regular, `${arrowScaleWords(exaggeration)} (deviation from nominal, drawn ${exaggeration} times the map scale)`), { x: lx, y: f.y, size: 7.5, font: f.regular, color: INK });
}

/** Renders a check's report as PDF bytes. */
export async function renderReportPdf(report: Report, opts: ReportPdfOptions): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  const title = [opts.bedName, opts.checkTitle].filter((s): s is string => !!s).join(' — ') || report.pattern.name;
  doc.setTitle(`Gridproof bed check: ${title}`);
  doc.setCreator('Gridproof');
  doc.setProducer('Gridproof');
  const regular = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const f = new Flow(doc, opts.paper ?? 'a4', regular, bold);
  const inch = opts.units === 'in';
  // table cells: the web's resolution (lib/report/units), the unit in the column heading
  const cell = (mm: number) => formatLength(mm, inch ? 'in' : 'mm', { suffix: false });
  const signed = (mm: number) => formatLength(mm, inch ? 'in' : 'mm', { signed: true, suffix: false });
  const unitName = inch ? 'in' : 'mm';

  // Header
  f.y -= 16;
  f.text('Gridproof bed check', { size: 16, font: bold });
  f.y -= 14;
  f.text(`${opts.workshopName} · ${title}${opts.checkedAt ? ` · ${formatUtc(opts.checkedAt)}` : ''}`, { size: 9.5, color: MUTED });
  f.y -= 12;
  f.text(`Pattern: ${report.pattern.name}`, { size: 8.5, color: MUTED });

  // Verdict
  const s = report.summary;
  const unit = inch ? 'in' : 'mm';
  const shape = shapeLine(report, unit);
  f.y -= 10;
  const note = opts.photoNote !== undefined ? opts.photoNote : photoNote(report.photo?.quality);
  const sentenceLines = [...wrapText(regular, headlineUnderVerdict(report, unit), 10, f.textWidth - 20), ...(shape ? wrapText(regular, shape, 10, f.textWidth - 20) : [])];
  // the photo's problems, if any, in bold inside the verdict box: its figures carry them
  const noteLines = note ? wrapText(bold, note, 10, f.textWidth - 20) : [];
  const boxH = 22 + (sentenceLines.length + noteLines.length) * 13 + (noteLines.length ? 4 : 0);
  const verdictMark = BED_VERDICT_MARK[s.verdict];
  const verdictColour = rgb(...hexToRgb01(MARKS[verdictMark].colour));
  const boxGround = rgb(0.965, 0.973, 0.969);
  f.page.drawRectangle({ x: f.left, y: f.y - boxH, width: f.textWidth, height: boxH, color: boxGround });
  f.page.drawRectangle({ x: f.left, y: f.y - boxH, width: 4, height: boxH, color: verdictColour });
  f.y -= 16;
  drawMark(f.page, verdictMark, f.left + 17, f.y + 4, 5, boxGround);
  f.text(BED_VERDICT_WORD[s.verdict], { x: f.left + 27, size: 12, font: bold, color: verdictColour });
  for (const line of sentenceLines) {
    f.y -= 13;
    f.text(line, { x: f.left + 12, size: 10 });
  }
  if (noteLines.length) f.y -= 4;
  for (const line of noteLines) {
    f.y -= 13;
    f.text(line, { x: f.left + 12, size: 10, font: bold });
  }
  f.y -= 10;

  // Summary and lattice figures
  f.heading('Figures');
  const lat = report.lattice;
  const u = lat.uncertainty;
  const scaleLine = (name: string, v: number | null, sd: number | null) =>
    v === null ? `${name}: not measured.` : `${name}: ${formatPpm(v, sd)}, ${scaleOver(v, 1000, unit)} over 1 m (factor ${v.toFixed(6)}).`;
  const figures = [
    `${figureCards(reportCounts(report), formatLength(s.rmsMm, unit), formatLength(s.maxMm, unit)).map(([k, v]) => `${k} ${v}`).join(' · ')} · ${MARK_WORD.unmatched} ${report.unmatched.length}.`,
    `Lattice rotation on the photo: ${formatAngle(lat.rotationDeg, { sigmaDeg: u.rotationDeg })}; uncertainties are one standard deviation.`,
    scaleLine('Scale along X', lat.scaleX, u.scaleX),
    scaleLine('Scale along Y', lat.scaleY, u.scaleY),
    lat.squarenessDeg === null ? 'Squareness: not measured.' : `Squareness (departure of the X and Y rows from 90°): ${formatAngle(lat.squarenessDeg, { signed: true, sigmaDeg: u.squarenessDeg })}.`,
    ...(lat.observed ? [] : [`Scale and squareness could not be measured${lat.reason ? `: ${lat.reason}` : '.'}`]),
    ...(report.distances ?? []).map((d) => distanceSentence(d, (mm) => formatLength(mm, unit))),
    ...(lat.shapeCheck && lat.shapeCheck.worstMm !== null && lat.shapeCheck.uncertaintyMm !== null
      ? [`Overall size and squareness move a position by up to ${formatLength(lat.shapeCheck.worstMm, unit)} ± ${formatLength(bandRadiusMm(lat.shapeCheck.uncertaintyMm), unit)} (95 %) against ${formatLength(lat.shapeCheck.toleranceMm, unit)} allowed: ${lat.shapeCheck.verdict === 'in' ? 'within tolerance' : lat.shapeCheck.verdict === 'out' ? 'out of tolerance' : 'too close to call with this reference'}.`]
      : []),
    ...(s.formOut !== undefined ? [`Hole to hole (the lattice's own size and squareness taken out): ${s.formOut} out, ${s.formMarginal ?? 0} marginal.`] : []),
    `Lens model: focal length ${report.camera.focalPx.toFixed(0)} px, k1 ${report.camera.k1.toExponential(2)}, k2 ${report.camera.k2.toExponential(2)}.`,
  ];
  for (const line of figures) f.paragraph(line, { size: 9 });

  // Map
  const exaggeration = reportArrowScale(report);
  const mapH = Math.min(mmToPt(120), f.height * 0.42);
  if (!hasFormView(report)) {
    f.heading('Deviation map');
    drawMap(f, report, exaggeration, 'bed', mapH);
  } else {
    // the whole bed, then hole to hole smaller: the same marks and the same arrow scale, so the arrows compare
    for (const view of ['bed', 'form'] as const) {
      const h = view === 'bed' ? mapH : mapH * 0.62;
      // heading, note and map on one page
      f.ensure(mapGeometry(report).heightMm * mapScale(f, report, h) + 90);
      f.heading(`Deviation map: ${MAP_VIEW_WORD[view].toLowerCase()}`);
      f.paragraph(`${MAP_VIEW_WORD[view]}: ${MAP_VIEW_MEANING[view]}.`, { size: 8, color: MUTED });
      drawMap(f, report, exaggeration, view, h);
    }
  }

  // Panels
  if (report.panels.length) {
    f.heading('Panels and the moves that correct them');
    table(
      f,
      [
        { title: 'Panel', width: 50 },
        { title: `dX ${unitName}`, width: 48, align: 'right' },
        { title: `dY ${unitName}`, width: 48, align: 'right' },
        { title: 'Turn °', width: 44, align: 'right' },
        { title: 'Holes', width: 34, align: 'right' },
        { title: `± ${unitName}`, width: 40, align: 'right' },
        { title: 'Correcting move', width: 230, wrap: true },
      ],
      report.panels.map((q) => [q.id, signed(q.dx), signed(q.dy), formatAngle(q.rotationDeg, { signed: true, suffix: false }), String(q.positions), cell(q.uncertaintyMm), q.correction]),
    );
  }
  if (report.seams.length) {
    f.heading('Steps at panel seams');
    table(
      f,
      [
        { title: 'Between', width: 90 },
        { title: `dX ${unitName}`, width: 60, align: 'right' },
        { title: `dY ${unitName}`, width: 60, align: 'right' },
        { title: `Step ${unitName}`, width: 60, align: 'right' },
        { title: `± ${unitName}`, width: 60, align: 'right' },
      ],
      report.seams.map((m) => [`${m.a} / ${m.b}`, signed(m.dx), signed(m.dy), cell(m.r), cell(m.uncertaintyMm)]),
    );
  }

  // Positions out or marginal, on the whole bed or hole to hole (the worse of the two first)
  const RANK: Record<Verdict, number> = { out: 0, marginal: 1, in: 2, missing: 3 };
  const worstRank = (q: Report['positions'][number]) => Math.min(RANK[q.verdict], q.form ? RANK[q.form.verdict] : 3);
  const flagged = report.positions
    .filter((q) => q.verdict === 'out' || q.verdict === 'marginal' || q.form?.verdict === 'out' || q.form?.verdict === 'marginal')
    .sort((a, b) => worstRank(a) - worstRank(b) || (b.deviation?.r ?? 0) - (a.deviation?.r ?? 0));
  f.heading('Positions out of tolerance or marginal');
  if (!flagged.length) f.paragraph('None: every measured position is within its tolerance.');
  else {
    const maxRows = opts.maxPositionRows ?? 400;
    table(
      f,
      [
        { title: 'Position', width: 70 },
        { title: 'Family', width: 55 },
        { title: 'Panel', width: 45 },
        { title: `dX ${unitName}`, width: 55, align: 'right' },
        { title: `dY ${unitName}`, width: 55, align: 'right' },
        { title: `Off ${unitName}`, width: 55, align: 'right' },
        { title: `Allowed ${unitName}`, width: 60, align: 'right' },
        { title: 'Whole bed', width: 50 },
        { title: `Hole to hole ${unitName}`, width: 60, align: 'right' },
        { title: 'Hole to hole', width: 55 },
      ],
      flagged.slice(0, maxRows).map((q) => [
        q.label, q.family, q.panel ?? '',
        q.deviation ? signed(q.deviation.dx) : '', q.deviation ? signed(q.deviation.dy) : '',
        q.deviation ? cell(q.deviation.r) : '', cell(q.toleranceMm), MARK_WORD[q.verdict],
        q.form ? cell(q.form.r) : '', q.form ? MARK_WORD[q.form.verdict] : '',
      ]),
    );
    if (flagged.length > maxRows) f.paragraph(`… and ${flagged.length - maxRows} more (see the report online).`, { color: MUTED });
  }
  const missing = report.positions.filter((q) => positionMark(q) === 'missing');
  const hidden = report.positions.filter((q) => positionMark(q) === 'hidden');
  if (missing.length) {
    f.y -= 6;
    f.paragraph(`${MARK_WORD.missing} (${missing.length}): ${missing.slice(0, 120).map((q) => q.label).join(', ')}${missing.length > 120 ? ', …' : ''}`, { size: 8, color: MUTED });
  }
  // hidden positions grouped by why they were not seen (not measured: neither in nor out)
  const byReason = new Map<string, string[]>();
  for (const q of hidden) {
    const w = outOfSightWords(q)!;
    byReason.set(w, [...(byReason.get(w) ?? []), q.label]);
  }
  for (const [words, labels] of byReason) {
    f.paragraph(`${MARK_WORD.hidden}, ${words} (${labels.length}): ${labels.slice(0, 60).join(', ')}${labels.length > 60 ? ', …' : ''}`, { size: 8, color: MUTED });
  }

  // How the tolerances were set, as on every surface
  const method = methodNote(opts.fits ?? null, unit);
  f.heading(method.heading);
  for (const line of opts.fits === undefined ? [method.note] : methodNoteLines(method)) f.paragraph(line, { size: 8.5 });

  // Comments
  if (opts.comments?.length) {
    f.heading('Comments');
    for (const c of opts.comments) {
      f.paragraph(`${c.author ?? 'Former member'}${c.positionLabel ? ` on ${c.positionLabel}` : ''} · ${formatUtc(c.createdAt)}`, { size: 8, font: bold, color: MUTED });
      f.paragraph(c.body, { size: 9, indent: 8 });
      f.y -= 4;
    }
  }

  // Footers
  const n = f.pages.length;
  f.pages.forEach((page, k) => {
    const footer = drawable(regular, `Gridproof · ${opts.workshopName} · bed frame: origin front-left, +X right, +Y away from the operator · page ${k + 1} of ${n}`);
    page.drawText(footer, { x: f.margin, y: f.margin - 4, size: 6.5, font: regular, color: MUTED });
  });
  return doc.save();
}
