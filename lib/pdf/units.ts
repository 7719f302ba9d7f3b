/**
 * Units and paper for Gridproof's PDFs. PDF user space: points, 1 pt = 1/72 in (ISO 32000-1 §8.3.2.3, with
 * no UserUnit), origin at the page's bottom-left corner, +x right, +y up. 1 in = 25.4 mm exactly
 * (international inch, 1959).
 */
import { MM_PER_IN } from '@/lib/geometry/contract';

/** Points per inch in PDF user space (ISO 32000-1). */
export const PT_PER_IN = 72;

/** Millimetres → PDF points. */
export function mmToPt(mm: number): number {
  return (mm * PT_PER_IN) / MM_PER_IN;
}

/** PDF points → millimetres. */
export function ptToMm(pt: number): number {
  return (pt * MM_PER_IN) / PT_PER_IN;
}

export const PAPERS = ['a4', 'letter', 'a3', 'tabloid'] as const;
export type Paper = (typeof PAPERS)[number];

/**
 * Portrait paper sizes, mm: A4 is 210 × 297 mm and A3 297 × 420 mm (ISO 216); US Letter is 8.5 × 11 in and Tabloid
 * (ANSI B) 11 × 17 in (ANSI/ASME Y14.1).
 */
export const PAPER_MM: Record<Paper, { widthMm: number; heightMm: number }> = {
  a4: { widthMm: 210, heightMm: 297 },
  letter: { widthMm: 8.5 * MM_PER_IN, heightMm: 11 * MM_PER_IN },
  a3: { widthMm: 297, heightMm: 420 },
  tabloid: { widthMm: 11 * MM_PER_IN, heightMm: 17 * MM_PER_IN },
};

/** Paper names as printed on a page. */
export const PAPER_NAME: Record<Paper, string> = { a4: 'A4', letter: 'US Letter', a3: 'A3', tabloid: 'US Tabloid' };

/** Portrait page size in points. */
export function paperSizePt(paper: Paper): [number, number] {
  const p = PAPER_MM[paper];
  return [mmToPt(p.widthMm), mmToPt(p.heightMm)];
}
