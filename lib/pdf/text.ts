/**
 * Text helpers for PDFs drawn with the standard Helvetica fonts (WinAnsi encoding): characters the font cannot
 * encode are replaced by close ASCII spellings, and long text is wrapped to a width in points.
 */
import type { PDFFont } from 'pdf-lib';

const REPLACEMENTS: Record<string, string> = {
  '→': '->', '←': '<-', '↑': '^', '↓': 'v', '≈': '~', '≤': '<=', '≥': '>=', '≠': '!=', '−': '-', '×': 'x',
  '′': "'", '″': '"', '‧': '.', '⋅': '.', '∠': 'angle ', '∆': 'delta ', 'Δ': 'delta ', '√': 'sqrt', 'σ': 'sigma', '\u00a0': ' ',
  '\u2009': ' ', '\u202f': ' ', '\t': ' ',
};

/** Makes `text` drawable in `font`: known symbols become ASCII, any other unsupported character becomes '?'. */
export function drawable(font: PDFFont, text: string): string {
  const supported = new Set(font.getCharacterSet());
  let out = '';
  for (const ch of text.replace(/\r?\n/g, ' ')) {
    const cp = ch.codePointAt(0) ?? 63;
    if (supported.has(cp)) out += ch;
    else if (REPLACEMENTS[ch] !== undefined) out += REPLACEMENTS[ch];
    else out += '?';
  }
  return out;
}

/** Splits text into lines no wider than `maxWidthPt` at `size` (words longer than a line are cut). */
export function wrapText(font: PDFFont, text: string, size: number, maxWidthPt: number): string[] {
  const lines: string[] = [];
  for (const paragraph of text.split(/\r?\n/)) {
    const words = drawable(font, paragraph).split(/ +/).filter((w) => w !== '');
    let line = '';
    for (let word of words) {
      while (font.widthOfTextAtSize(word, size) > maxWidthPt && word.length > 1) {
        // Longest prefix that fits, by bisection (width grows with length).
        let lo = 1;
        let hi = word.length - 1;
        while (lo < hi) {
          const mid = Math.ceil((lo + hi) / 2);
          if (font.widthOfTextAtSize(word.slice(0, mid), size) <= maxWidthPt) lo = mid;
          else hi = mid - 1;
        }
        const cut = lo;
        if (line) lines.push(line);
        lines.push(word.slice(0, cut));
        line = '';
        word = word.slice(cut);
      }
      const next = line ? `${line} ${word}` : word;
      if (font.widthOfTextAtSize(next, size) <= maxWidthPt) line = next;
      else {
        if (line) lines.push(line);
        line = word;
      }
    }
    lines.push(line);
  }
  return lines;
}
