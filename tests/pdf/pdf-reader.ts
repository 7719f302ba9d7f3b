/**
 * A small reader for the tests: loads a PDF's object structure with pdf-lib's parser, inflates each page's
 * content stream with Node's zlib (FlateDecode, ISO 32000-1 §7.4.4) and interprets the path, colour, state and
 * text operators of ISO 32000-1 (§8.4 graphics state and `cm`, §8.5 path construction and painting, §9.4 text
 * objects) to give what the page paints, in default user space (pt, origin bottom-left, +y up). It never
 * reads the generator's constants: only the bytes of the file.
 */
import { inflateSync } from 'node:zlib';
import { PDFArray, PDFDict, PDFDocument, PDFName, PDFNumber, PDFRawStream, type PDFPage } from 'pdf-lib';

export type Pt = [number, number];
export type Matrix = [number, number, number, number, number, number];

export interface PaintedPath {
  subpaths: Pt[][];
  fill: 'nonzero' | 'evenodd' | null;
  stroke: boolean;
  fillGrey: number | null;
  strokeGrey: number | null;
  /** Fill colour as RGB in [0, 1] (grey g gives [g, g, g]). */
  fillRgb: [number, number, number] | null;
  lineWidth: number;
}

export interface ShownText {
  text: string;
  origin: Pt;
  size: number;
  /** The font's BaseFont name from the page resources, e.g. "Helvetica-Bold". */
  baseFont: string | null;
}

export interface PageContent {
  paths: PaintedPath[];
  texts: ShownText[];
  mediaBox: [number, number, number, number];
  userUnit: number | null;
}

type Token = { kind: 'num'; v: number } | { kind: 'name'; v: string } | { kind: 'str'; v: string } | { kind: 'op'; v: string } | { kind: 'array'; v: Token[] };

function tokenize(src: string): Token[] {
  const out: Token[] = [];
  const stack: Token[][] = [out];
  let i = 0;
  const push = (t: Token) => stack[stack.length - 1]!.push(t);
  while (i < src.length) {
    const c = src[i]!;
    if (/\s/.test(c)) { i += 1; continue; }
    if (c === '%') { while (i < src.length && src[i] !== '\n' && src[i] !== '\r') i += 1; continue; }
    if (c === '[') { const arr: Token[] = []; push({ kind: 'array', v: arr }); stack.push(arr); i += 1; continue; }
    if (c === ']') { stack.pop(); i += 1; continue; }
    if (c === '/') {
      let j = i + 1;
      while (j < src.length && !/[\s/[\]<>()%{}]/.test(src[j]!)) j += 1;
      push({ kind: 'name', v: src.slice(i + 1, j) });
      i = j;
      continue;
    }
    if (c === '(') {
      let depth = 1; let j = i + 1; let s = '';
      while (j < src.length && depth > 0) {
        const d = src[j]!;
        if (d === '\\') { s += src[j + 1] ?? ''; j += 2; continue; }
        if (d === '(') depth += 1;
        if (d === ')') { depth -= 1; if (depth === 0) break; }
        s += d; j += 1;
      }
      push({ kind: 'str', v: s });
      i = j + 1;
      continue;
    }
    if (c === '<' && src[i + 1] !== '<') {
      const j = src.indexOf('>', i);
      const hex = src.slice(i + 1, j).replace(/\s+/g, '');
      let s = '';
      for (let k = 0; k < hex.length; k += 2) s += String.fromCharCode(parseInt(hex.slice(k, k + 2).padEnd(2, '0'), 16));
      push({ kind: 'str', v: s });
      i = j + 1;
      continue;
    }
    if (c === '<' || c === '>') { i += 2; continue; } // inline dictionaries do not occur in our pages' operators
    let j = i;
    while (j < src.length && !/[\s/[\]<>()%]/.test(src[j]!)) j += 1;
    const word = src.slice(i, j);
    const n = Number(word);
    push(word !== '' && Number.isFinite(n) && /^[+-]?(\d+\.?\d*|\.\d+)$/.test(word) ? { kind: 'num', v: n } : { kind: 'op', v: word });
    i = Math.max(j, i + 1);
  }
  return out;
}

function mul(a: Matrix, b: Matrix): Matrix {
  // [a] then [b]: row-vector convention of ISO 32000-1 §8.3.4 (x' = a·x + c·y + e).
  return [
    a[0] * b[0] + a[1] * b[2], a[0] * b[1] + a[1] * b[3],
    a[2] * b[0] + a[3] * b[2], a[2] * b[1] + a[3] * b[3],
    a[4] * b[0] + a[5] * b[2] + b[4], a[4] * b[1] + a[5] * b[3] + b[5],
  ];
}

function apply(m: Matrix, x: number, y: number): Pt {
  return [m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5]];
}

function pageStreams(page: PDFPage): Uint8Array[] {
  const contents = page.node.Contents();
  if (!contents) return [];
  const list = contents instanceof PDFArray ? contents.asArray().map((r) => page.doc.context.lookup(r)) : [contents];
  return list.map((s) => {
    if (!(s instanceof PDFRawStream)) throw new Error('unexpected content stream object');
    const filter = s.dict.lookup(PDFName.of('Filter'));
    const raw = s.getContents();
    if (!filter) return raw;
    if (filter instanceof PDFName && filter.asString() === '/FlateDecode') return new Uint8Array(inflateSync(raw));
    throw new Error(`unsupported filter ${String(filter)}`);
  });
}

/** Everything page `index` paints, interpreted from its content stream. */
export async function readPage(bytes: Uint8Array, index = 0): Promise<PageContent> {
  const doc = await PDFDocument.load(bytes, { updateMetadata: false });
  const page = doc.getPage(index);
  const mb = page.node.MediaBox().asArray().map((n) => (n as PDFNumber).asNumber());
  const uu = page.node.lookup(PDFName.of('UserUnit'));
  const src = pageStreams(page).map((b) => Buffer.from(b).toString('latin1')).join('\n');

  type State = { ctm: Matrix; fillGrey: number | null; strokeGrey: number | null; fillRgb: [number, number, number] | null; lineWidth: number };
  let gs: State = { ctm: [1, 0, 0, 1, 0, 0], fillGrey: 0, strokeGrey: 0, fillRgb: [0, 0, 0], lineWidth: 1 };
  const saved: State[] = [];
  let subpaths: Pt[][] = [];
  let current: Pt[] | null = null;
  const paths: PaintedPath[] = [];
  const texts: ShownText[] = [];
  let tm: Matrix = [1, 0, 0, 1, 0, 0];
  let fontSize = 0;
  let fontName: string | null = null;
  const fonts = page.node.Resources()?.lookup(PDFName.of('Font'));
  const baseFontOf = (resName: string | null): string | null => {
    if (!resName || !(fonts instanceof PDFDict)) return null;
    const f = fonts.lookup(PDFName.of(resName));
    const bf = f instanceof PDFDict ? f.lookup(PDFName.of('BaseFont')) : undefined;
    return bf instanceof PDFName ? bf.asString().slice(1) : null;
  };
  let operands: Token[] = [];
  const num = (k: number) => { const t = operands[operands.length - k]; if (!t || t.kind !== 'num') throw new Error('expected a number'); return t.v; };
  const paint = (fillRule: PaintedPath['fill'], doStroke: boolean, close: boolean) => {
    if (close && current) current.push(current[0]!);
    paths.push({ subpaths, fill: fillRule, stroke: doStroke, fillGrey: gs.fillGrey, strokeGrey: gs.strokeGrey, fillRgb: gs.fillRgb, lineWidth: gs.lineWidth * Math.hypot(gs.ctm[0], gs.ctm[1]) });
    subpaths = []; current = null;
  };
  for (const t of tokenize(src)) {
    if (t.kind !== 'op') { operands.push(t); continue; }
    const op = t.v;
    switch (op) {
      case 'q': saved.push({ ...gs, ctm: [...gs.ctm] as Matrix }); break;
      case 'Q': gs = saved.pop() ?? gs; break;
      case 'cm': gs.ctm = mul([num(6), num(5), num(4), num(3), num(2), num(1)], gs.ctm); break;
      case 'w': gs.lineWidth = num(1); break;
      case 'g': gs.fillGrey = num(1); gs.fillRgb = [num(1), num(1), num(1)]; break;
      case 'G': gs.strokeGrey = num(1); break;
      case 'rg': gs.fillGrey = num(3) === num(2) && num(2) === num(1) ? num(1) : null; gs.fillRgb = [num(3), num(2), num(1)]; break;
      case 'RG': gs.strokeGrey = num(3) === num(2) && num(2) === num(1) ? num(1) : null; break;
      case 'm': current = [apply(gs.ctm, num(2), num(1))]; subpaths.push(current); break;
      case 'l': current?.push(apply(gs.ctm, num(2), num(1))); break;
      case 'c': current?.push(apply(gs.ctm, num(2), num(1))); break;
      case 'v': case 'y': current?.push(apply(gs.ctm, num(2), num(1))); break;
      case 'h': if (current) current.push(current[0]!); break;
      case 're': {
        const [x, y, w, h] = [num(4), num(3), num(2), num(1)];
        current = [apply(gs.ctm, x, y), apply(gs.ctm, x + w, y), apply(gs.ctm, x + w, y + h), apply(gs.ctm, x, y + h), apply(gs.ctm, x, y)];
        subpaths.push(current);
        break;
      }
      case 'f': case 'F': paint('nonzero', false, false); break;
      case 'f*': paint('evenodd', false, false); break;
      case 'B': paint('nonzero', true, false); break;
      case 'B*': paint('evenodd', true, false); break;
      case 'b': paint('nonzero', true, true); break;
      case 'b*': paint('evenodd', true, true); break;
      case 'S': paint(null, true, false); break;
      case 's': paint(null, true, true); break;
      case 'n': subpaths = []; current = null; break;
      case 'BT': tm = [1, 0, 0, 1, 0, 0]; break;
      case 'Tf': {
        fontSize = num(1);
        const n = operands[operands.length - 2];
        fontName = n && n.kind === 'name' ? n.v : null;
        break;
      }
      case 'Tm': tm = [num(6), num(5), num(4), num(3), num(2), num(1)]; break;
      case 'Td': tm = mul([1, 0, 0, 1, num(2), num(1)], tm); break;
      case 'Tj': {
        const s = operands[operands.length - 1];
        const m = mul(tm, gs.ctm);
        texts.push({ text: s && s.kind === 'str' ? s.v : '', origin: apply(m, 0, 0), size: fontSize * Math.hypot(m[0], m[1]), baseFont: baseFontOf(fontName) });
        break;
      }
      default: break;
    }
    operands = [];
  }
  return { paths, texts, mediaBox: mb as [number, number, number, number], userUnit: uu instanceof PDFNumber ? uu.asNumber() : null };
}

/** Axis-aligned bounds of points. */
export function bounds(points: Pt[]): { minX: number; minY: number; maxX: number; maxY: number } {
  const xs = points.map((p) => p[0]);
  const ys = points.map((p) => p[1]);
  return { minX: Math.min(...xs), minY: Math.min(...ys), maxX: Math.max(...xs), maxY: Math.max(...ys) };
}

/** Winding number of a closed polygon around a point. */
function winding(poly: Pt[], [px, py]: Pt): number {
  let w = 0;
  for (let k = 0; k + 1 < poly.length; k += 1) {
    const [x1, y1] = poly[k]!;
    const [x2, y2] = poly[k + 1]!;
    const cross = (x2 - x1) * (py - y1) - (px - x1) * (y2 - y1);
    if (y1 <= py && y2 > py && cross > 0) w += 1;
    else if (y1 > py && y2 <= py && cross < 0) w -= 1;
  }
  return w;
}

/** Is the point painted by this filled path, by its own fill rule (ISO 32000-1 §8.5.3.3)? Straight edges only. */
export function covers(path: PaintedPath, p: Pt): boolean {
  if (!path.fill) return false;
  const ws = path.subpaths.map((s) => winding(s[0] === s[s.length - 1] ? s : [...s, s[0]!], p));
  const total = ws.reduce((a, b) => a + b, 0);
  if (path.fill === 'nonzero') return total !== 0;
  return ws.reduce((n, w) => n + Math.abs(w), 0) % 2 === 1;
}

/** Is the point painted black by any filled path of the page? */
export function blackAt(content: PageContent, p: Pt): boolean {
  let black = false;
  for (const path of content.paths) if (covers(path, p)) black = path.fillGrey === 0;
  return black;
}
