/**
 * Gridproof's verdict marks: a colour AND a shape per verdict, so a verdict reads without colour vision and in
 * a grey print. Hues are our own, chosen on the blue–amber axis that the three common colour-vision
 * deficiencies keep apart (deutan and protan confuse red with green, tritan confuses blue with green; none
 * confuses a dark blue with a light amber), and spread in lightness so greyscale still separates them:
 * in = dark cobalt, filled disc; marginal = light saffron, triangle; out = deep brick, square with a cross;
 * missing = slate ring (hollow); unmatched detection = plus sign in violet-grey.
 */
import type { Verdict } from '@/lib/geometry/contract';

export type Mark = Verdict | 'unmatched';

export interface MarkStyle {
  /** Fill/stroke colour on a light ground. */
  colour: string;
  /** Colour for a dark ground (same hue, lighter). */
  colourDark: string;
  shape: 'disc' | 'triangle' | 'crossed-square' | 'ring' | 'plus';
  label: string;
  /** What the mark means, in a machinist's words. */
  meaning: string;
}

export const MARKS: Record<Mark, MarkStyle> = {
  in: { colour: '#1b4f9c', colourDark: '#7fb0ff', shape: 'disc', label: 'In', meaning: 'within the fit tolerance, with room to spare' },
  marginal: { colour: '#c98a00', colourDark: '#ffc94a', shape: 'triangle', label: 'Marginal', meaning: 'too close to the tolerance to call either way' },
  out: { colour: '#9c2a1c', colourDark: '#ff8a73', shape: 'crossed-square', label: 'Out', meaning: 'beyond the fit tolerance: what goes in may bind' },
  missing: { colour: '#55606e', colourDark: '#aab4c0', shape: 'ring', label: 'Not seen', meaning: 'expected but not found in the photo' },
  unmatched: { colour: '#7a5a9a', colourDark: '#c9a8ef', shape: 'plus', label: 'Unmatched', meaning: 'a detected hole that fits no position of the pattern' },
};

export const MARK_ORDER: Mark[] = ['out', 'marginal', 'in', 'missing', 'unmatched'];

/** SVG path data of a mark of radius r centred on (0, 0) (translate it into place). */
export function markPath(shape: MarkStyle['shape'], r: number): string {
  const f = (v: number) => Number(v.toFixed(3));
  switch (shape) {
    case 'disc':
      return `M ${f(-r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(-r)} 0 Z`;
    case 'ring':
      return `M ${f(-r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(r)} 0 A ${f(r)} ${f(r)} 0 1 0 ${f(-r)} 0 Z`;
    case 'triangle': {
      const h = r * 1.25;
      return `M 0 ${f(-h)} L ${f(h * 0.95)} ${f(h * 0.7)} L ${f(-h * 0.95)} ${f(h * 0.7)} Z`;
    }
    case 'crossed-square': {
      const s = r * 0.95;
      return `M ${f(-s)} ${f(-s)} H ${f(s)} V ${f(s)} H ${f(-s)} Z M ${f(-s)} ${f(-s)} L ${f(s)} ${f(s)} M ${f(s)} ${f(-s)} L ${f(-s)} ${f(s)}`;
    }
    case 'plus':
      return `M ${f(-r)} 0 H ${f(r)} M 0 ${f(-r)} V ${f(r)}`;
  }
}

/** True when the shape is drawn as an outline (no fill). */
export const outlined = (shape: MarkStyle['shape']) => shape === 'ring' || shape === 'plus';
