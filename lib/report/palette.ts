/**
 * Gridproof's marks, the one module every surface draws them from (web report, shared page, comparison, PDF,
 * mail image, verdict boxes): a colour AND a shape per mark, so a mark reads without colour vision and in a grey
 * print. Hues are our own, chosen on the blue–amber axis that the three common colour-vision deficiencies keep
 * apart (deutan and protan confuse red with green, tritan confuses blue with green; none confuses a dark blue
 * with a light amber); in grey the light saffron stands apart from the dark cobalt and brick, which their shapes
 * tell apart:
 * in = dark cobalt, filled disc; marginal = light saffron, triangle; out = deep brick, square with a cross;
 * not seen = slate ring (hollow); not in view = small pale slate dot; unmatched detection = plus sign in
 * violet-grey.
 *
 * Shapes are SVG path data centred on (0, 0) in a y-down frame (SVG, and pdf-lib's drawSvgPath, which flips
 * it onto the page's y-up), as layers: a layer is filled and/or stroked with the mark's colour or the ground's.
 */
import { MARK_MEANING, MARK_WORD, type Mark } from './words';

export type { Mark };
export type MarkShapeName = 'disc' | 'triangle' | 'crossed-square' | 'ring' | 'dot' | 'plus';

export interface MarkStyle {
  /** Fill/stroke colour on a light ground, #rrggbb. */
  colour: string;
  /** Colour for a dark ground (same hue, lighter), #rrggbb. */
  colourDark: string;
  shape: MarkShapeName;
  label: string;
  /** What the mark means, in a machinist's words. */
  meaning: string;
}

const style = (mark: Mark, colour: string, colourDark: string, shape: MarkShapeName): MarkStyle => ({ colour, colourDark, shape, label: MARK_WORD[mark], meaning: MARK_MEANING[mark] });

export const MARKS: Record<Mark, MarkStyle> = {
  in: style('in', '#1b4f9c', '#7fb0ff', 'disc'),
  marginal: style('marginal', '#c98a00', '#ffc94a', 'triangle'),
  out: style('out', '#9c2a1c', '#ff8a73', 'crossed-square'),
  missing: style('missing', '#55606e', '#aab4c0', 'ring'),
  hidden: style('hidden', '#8d96a1', '#7d8690', 'dot'),
  unmatched: style('unmatched', '#7a5a9a', '#c9a8ef', 'plus'),
};

/** Legend order, worst first. */
export const MARK_ORDER: Mark[] = ['out', 'marginal', 'in', 'missing', 'hidden', 'unmatched'];
/** The marks a position can have (the legend of a map of positions). */
export const POSITION_MARKS: Mark[] = MARK_ORDER.filter((m) => m !== 'unmatched');

/** One painted layer of a mark: SVG path data (y down, centred on 0, 0) and what paints it. */
export interface MarkLayer {
  d: string;
  /** Filled with the mark's colour, the ground's, or not at all. */
  fill: 'mark' | 'ground' | null;
  stroke: 'mark' | 'ground' | null;
  /** Stroke width, same units as r. */
  strokeWidth: number;
}

const f = (v: number) => Number(v.toFixed(3));
const circle = (r: number) => `M ${f(-r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(-r)} 0 Z`;

/** The layers of `mark` drawn with radius r (its size on the map) centred on (0, 0). */
export function markLayers(mark: Mark, r: number): MarkLayer[] {
  const edge = f(r * 0.14);
  const line = f(r * 0.32);
  switch (MARKS[mark].shape) {
    case 'disc':
      return [{ d: circle(r), fill: 'mark', stroke: 'ground', strokeWidth: edge }];
    case 'triangle': {
      const h = r * 1.25;
      return [{ d: `M 0 ${f(-h)} L ${f(h * 0.95)} ${f(h * 0.7)} L ${f(-h * 0.95)} ${f(h * 0.7)} Z`, fill: 'mark', stroke: 'ground', strokeWidth: edge }];
    }
    case 'crossed-square': {
      const s = r * 0.95, c = s * 0.6;
      return [
        { d: `M ${f(-s)} ${f(-s)} L ${f(s)} ${f(-s)} L ${f(s)} ${f(s)} L ${f(-s)} ${f(s)} Z`, fill: 'mark', stroke: null, strokeWidth: 0 },
        { d: `M ${f(-c)} ${f(-c)} L ${f(c)} ${f(c)} M ${f(c)} ${f(-c)} L ${f(-c)} ${f(c)}`, fill: null, stroke: 'ground', strokeWidth: line },
      ];
    }
    case 'ring':
      return [{ d: circle(r * 0.85), fill: null, stroke: 'mark', strokeWidth: line }];
    case 'dot':
      return [{ d: circle(r * 0.45), fill: 'mark', stroke: null, strokeWidth: 0 }];
    case 'plus':
      return [{ d: `M ${f(-r)} 0 L ${f(r)} 0 M 0 ${f(-r)} L 0 ${f(r)}`, fill: null, stroke: 'mark', strokeWidth: line }];
  }
}

/** #rrggbb → [r, g, b] in [0, 1] (pdf-lib's rgb()). */
export function hexToRgb01(hex: string): [number, number, number] {
  const n = Number.parseInt(hex.replace('#', ''), 16);
  return [((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255];
}

/** The mark as SVG markup at (x, y), for SVG drawn as text (the mail's map image): `ground` is the map's colour. */
export function markSvg(mark: Mark, x: number, y: number, r: number, ground: string): string {
  const paint = (p: 'mark' | 'ground' | null) => (p === 'mark' ? MARKS[mark].colour : p === 'ground' ? ground : 'none');
  const layers = markLayers(mark, r).map((l) => `<path d="${l.d}" fill="${paint(l.fill)}"${l.stroke ? ` stroke="${paint(l.stroke)}" stroke-width="${l.strokeWidth}"` : ''}/>`);
  return `<g transform="translate(${x.toFixed(2)} ${y.toFixed(2)})" data-mark="${mark}">${layers.join('')}</g>`;
}
