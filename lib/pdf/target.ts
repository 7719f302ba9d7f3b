/**
 * The printable reference target as a one-page PDF at exact scale (pdf-lib).
 *
 * Page frame: PDF points (1 pt = 1/72 in, ISO 32000-1), origin bottom-left of the page, +x right, +y up.
 * The target's geometry (frame stroke, orientation mark, white margin) comes from lib/vision/target.ts, so what
 * is printed is what the detector looks for: corner 0 of the target frame (the one next to the mark) is the
 * square's bottom-left corner on the page. Every other mark on the page (text, ruler) stays outside the white
 * margin the detector needs around the frame.
 */
import { LineCapStyle, PDFDocument, PrintScaling, StandardFonts, rgb, type PDFFont, type PDFPage } from 'pdf-lib';
import {
  PDFOperator,
  PDFOperatorNames,
  lineTo,
  moveTo,
  popGraphicsState,
  pushGraphicsState,
  rectangle,
  setFillingGrayscaleColor,
  setLineCap,
  setLineWidth,
  setStrokingGrayscaleColor,
  stroke,
  fill,
} from 'pdf-lib';
import { z } from 'zod';
import { MM_PER_IN } from '@/lib/geometry/contract';
import { FRAME_FRACTION, MARK_CENTRE_FRACTION, MARK_FRACTION, paperMarginMm } from '@/lib/vision/target';
import { wrapText } from './text';
import { mmToPt, PAPER_NAME, paperSizePt, PAPERS, type Paper } from './units';

export const TARGET_SIZES = ['100mm', '150mm', '4in', '250mm'] as const;
export type TargetSize = (typeof TARGET_SIZES)[number];

/** Stated outer size of each printable target, mm (4 in = 101.6 mm exactly). */
export const TARGET_SIZE_MM: Record<TargetSize, number> = { '100mm': 100, '150mm': 150, '4in': 4 * MM_PER_IN, '250mm': 250 };

/** The papers each target is printed on: the small ones on A4 and Letter, the 250 mm one on A3 and Tabloid. */
export const TARGET_PAPERS: Record<TargetSize, readonly Paper[]> = { '100mm': ['a4', 'letter'], '150mm': ['a4', 'letter'], '4in': ['a4', 'letter'], '250mm': ['a3', 'tabloid'] };

/** The options as they arrive from a request (`?size=150mm&paper=a4`); a query may leave either out (`TargetPdfQuerySchema`). */
export const TargetPdfOptionsSchema = z.object({ size: z.enum(TARGET_SIZES), paper: z.enum(PAPERS) }).refine((o) => TARGET_PAPERS[o.size].includes(o.paper), {
  message: 'that target is not printed on that paper: 100 mm, 150 mm and 4 in on A4 or Letter, 250 mm on A3 or Tabloid',
  path: ['paper'],
});
export type TargetPdfOptions = z.infer<typeof TargetPdfOptionsSchema>;

/** A request's query: the size defaults to 150 mm, the paper to the size's first (A4, or A3 for 250 mm). */
export const TargetPdfQuerySchema = z
  .object({ size: z.enum(TARGET_SIZES).optional(), paper: z.enum(PAPERS).optional() })
  .transform((q) => ({ size: q.size ?? '150mm', paper: q.paper ?? TARGET_PAPERS[q.size ?? '150mm'][0]! }))
  .pipe(TargetPdfOptionsSchema);

/** A download name such as `gridproof-target-150mm-a4.pdf`. */
export function targetPdfFilename(options: TargetPdfOptions): string {
  return `gridproof-target-${options.size}-${options.paper}.pdf`;
}

/** Where things were drawn on the page, pt (for callers that overlay or preview). */
export interface TargetLayout {
  pageWidthPt: number;
  pageHeightPt: number;
  /** The square's outer edge: bottom-left corner (corner 0, next to the mark) and side, pt. */
  square: { xPt: number; yPt: number; sidePt: number };
}

const PAGE_MARGIN_MM = 10;

function inchLabel(sizeMm: number): string {
  return `${(sizeMm / MM_PER_IN).toFixed(3)} in`;
}

/** `f*`: fill the current path by the even-odd rule (ISO 32000-1 §8.5.3.3). */
const fillEvenOdd = () => PDFOperator.of(PDFOperatorNames.FillEvenOdd);

/** Draws the target frame (even-odd fill of the outer and inner squares) and the orientation mark. */
function drawFrame(page: PDFPage, x: number, y: number, side: number): void {
  const w = FRAME_FRACTION * side;
  const markSide = MARK_FRACTION * side;
  const markCentre = MARK_CENTRE_FRACTION * side;
  page.pushOperators(
    pushGraphicsState(),
    setFillingGrayscaleColor(0),
    rectangle(x, y, side, side),
    rectangle(x + w, y + w, side - 2 * w, side - 2 * w),
    fillEvenOdd(),
    rectangle(x + markCentre - markSide / 2, y + markCentre - markSide / 2, markSide, markSide),
    fill(),
    popGraphicsState(),
  );
}

/** A check ruler: a millimetre scale above the base line pair and an inch scale below, from `x`, pt. */
function drawRuler(page: PDFPage, font: PDFFont, x: number, yMid: number, lengthMm: number): number {
  const lineWidth = mmToPt(0.15);
  const gap = mmToPt(1.2);
  const mmBase = yMid + gap / 2;
  const inBase = yMid - gap / 2;
  const ops = [pushGraphicsState(), setStrokingGrayscaleColor(0), setLineWidth(lineWidth), setLineCap(LineCapStyle.Butt)];
  const seg = (x1: number, y1: number, x2: number, y2: number) => ops.push(moveTo(x1, y1), lineTo(x2, y2), stroke());
  seg(x, mmBase, x + mmToPt(lengthMm), mmBase);
  for (let mm = 0; mm <= lengthMm; mm += 1) {
    const len = mm % 10 === 0 ? 4 : mm % 5 === 0 ? 3 : 2;
    seg(x + mmToPt(mm), mmBase, x + mmToPt(mm), mmBase + mmToPt(len));
  }
  const sixteenths = Math.floor((lengthMm / MM_PER_IN) * 16 + 1e-9);
  seg(x, inBase, x + (sixteenths / 16) * 72, inBase);
  for (let k = 0; k <= sixteenths; k += 1) {
    const len = k % 16 === 0 ? 4 : k % 8 === 0 ? 3.2 : k % 4 === 0 ? 2.6 : k % 2 === 0 ? 2 : 1.4;
    seg(x + (k / 16) * 72, inBase, x + (k / 16) * 72, inBase - mmToPt(len));
  }
  ops.push(popGraphicsState());
  page.pushOperators(...ops);
  const labelSize = 6.5;
  for (let mm = 0; mm <= lengthMm; mm += 10) {
    const t = String(mm);
    page.drawText(t, { x: x + mmToPt(mm) - font.widthOfTextAtSize(t, labelSize) / 2, y: mmBase + mmToPt(4.8), size: labelSize, font });
  }
  page.drawText('mm', { x: x + mmToPt(lengthMm) + mmToPt(2), y: mmBase + mmToPt(0.8), size: labelSize, font });
  for (let inch = 0; inch * 16 <= sixteenths; inch += 1) {
    const t = String(inch);
    page.drawText(t, { x: x + inch * 72 - font.widthOfTextAtSize(t, labelSize) / 2, y: inBase - mmToPt(4) - labelSize, size: labelSize, font });
  }
  page.drawText('in', { x: x + (sixteenths / 16) * 72 + mmToPt(2), y: inBase - mmToPt(2.4), size: labelSize, font });
  // Height used above and below yMid, pt.
  return mmBase + mmToPt(4.8) + labelSize - (inBase - mmToPt(4) - labelSize * 1.2);
}

/** Renders the printable target (one page) and reports where the square is. */
export async function renderTargetPdfWithLayout(input: TargetPdfOptions): Promise<{ bytes: Uint8Array; layout: TargetLayout }> {
  const options = TargetPdfOptionsSchema.parse(input);
  const sizeMm = TARGET_SIZE_MM[options.size];
  const [pageW, pageH] = paperSizePt(options.paper);
  const doc = await PDFDocument.create();
  const paperName = PAPER_NAME[options.paper];
  doc.setTitle(`Gridproof reference target, ${options.size === '4in' ? '4 in' : `${sizeMm} mm`}, ${paperName}`);
  doc.setSubject('Printable reference square for photographing a CNC fixture bed');
  doc.setCreator('Gridproof');
  doc.setProducer('Gridproof');
  doc.setCreationDate(new Date(0));
  doc.setModificationDate(new Date(0));
  // Ask viewers to print without scaling (PDF 1.6 ViewerPreferences /PrintScaling /None); the text says it too.
  doc.catalog.getOrCreateViewerPreferences().setPrintScaling(PrintScaling.None);
  const page = doc.addPage([pageW, pageH]);
  const regular = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);

  const margin = mmToPt(PAGE_MARGIN_MM);
  const textWidth = pageW - 2 * margin;
  const side = mmToPt(sizeMm);
  const clear = mmToPt(paperMarginMm(sizeMm) + 1);
  const ink = rgb(0, 0, 0);
  const grey = rgb(0.25, 0.25, 0.25);
  let y = pageH - margin;

  const statedSize = options.size === '4in' ? `4 in (${sizeMm.toFixed(1)} mm)` : `${sizeMm} mm (${inchLabel(sizeMm)})`;
  const titleSize = 15;
  y -= titleSize;
  page.drawText('Gridproof reference target', { x: margin, y, size: titleSize, font: bold, color: ink });
  y -= 13;
  page.drawText(`Outer edge of the black square: ${statedSize}. Paper: ${paperName}.`, { x: margin, y, size: 10, font: regular, color: ink });
  y -= 6;

  const steps = [
    'Print at 100 % ("Actual size"). Switch off "Fit to page", "Shrink to fit" and any other scaling.',
    'Measure the outer edge of the black square along both sides with a steel rule or caliper. Lay your rule on the printed rulers below as well: both scales should agree with it.',
    'Enter the size you measured, not the printed one, as the reference size of the check. If the two sides differ by more than 0.5 mm, print again on another printer.',
    'Lay the sheet flat on the bed with the whole square in the photo and nothing on top of it; tape it down outside the black frame. The small black square inside marks corner 0.',
  ];
  const stepSize = 8.6;
  const lineStep = stepSize * 1.3;
  steps.forEach((s, k) => {
    const label = `${k + 1}.`;
    const lines = wrapText(regular, s, stepSize, textWidth - 14);
    lines.forEach((line, j) => {
      y -= lineStep;
      if (j === 0) page.drawText(label, { x: margin, y, size: stepSize, font: bold, color: ink });
      page.drawText(line, { x: margin + 14, y, size: stepSize, font: regular, color: ink });
    });
    y -= 2;
  });

  // The square, centred across the page, with the detector's white margin clear of everything else.
  const squareTop = y - clear;
  const sx = (pageW - side) / 2;
  const sy = squareTop - side;
  drawFrame(page, sx, sy, side);

  // Ruler below the square, starting under its left edge.
  // At least 110 mm, so the inch scale reaches past 4 in.
  const rulerLengthMm = Math.max(110, Math.ceil(sizeMm / 10) * 10);
  const rulerX = Math.min(sx, pageW - margin - mmToPt(rulerLengthMm) - mmToPt(8));
  const rulerMid = sy - clear - mmToPt(8.5);
  drawRuler(page, regular, rulerX, rulerMid, rulerLengthMm);

  // Caution and footer at the bottom.
  const cautionSize = 8;
  const caution = 'Before you reach onto the bed to lay down or pick up this sheet, switch the machine off and wait until the spindle has stopped. Follow the machine maker\'s manual and your workshop\'s safety rules; they come first.';
  const cautionLines = wrapText(regular, caution, cautionSize, textWidth - 48);
  let cy = rulerMid - mmToPt(12);
  page.drawText('Caution', { x: margin, y: cy, size: cautionSize + 1, font: bold, color: ink });
  cautionLines.forEach((line) => {
    page.drawText(line, { x: margin + 48, y: cy, size: cautionSize, font: regular, color: ink });
    cy -= cautionSize * 1.3;
  });
  page.drawText(`Gridproof printable target · ${options.size} · ${paperName}`, { x: margin, y: margin - 4, size: 6.5, font: regular, color: grey });
  if (cy < margin) throw new Error(`the ${options.size} target does not fit on ${paperName}`);

  const bytes = await doc.save({ useObjectStreams: false });
  return { bytes, layout: { pageWidthPt: pageW, pageHeightPt: pageH, square: { xPt: sx, yPt: sy, sidePt: side } } };
}

/** The printable target as PDF bytes: `renderTargetPdf({ size: '150mm', paper: 'a4' })`. */
export async function renderTargetPdf(options: TargetPdfOptions): Promise<Uint8Array> {
  return (await renderTargetPdfWithLayout(options)).bytes;
}
