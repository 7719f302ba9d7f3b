/**
 * The marks module: one shape per mark, hues the app's style sheet repeats exactly, and the light and dark
 * filled marks apart in grey (relative luminance of sRGB colours as WCAG 2.1 defines it); shape tells the dark ones apart.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { hexToRgb01, MARKS, markLayers, markSvg, type Mark } from '@/lib/report/palette';
import { MARK_WORD } from '@/lib/report/words';

const marks = Object.keys(MARKS) as Mark[];
// WCAG 2.1, "relative luminance": linearise each sRGB channel, weigh 0.2126 R + 0.7152 G + 0.0722 B.
const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
const luminance = (hex: string) => { const [r, g, b] = hexToRgb01(hex).map(lin) as [number, number, number]; return 0.2126 * r + 0.7152 * g + 0.0722 * b; };

describe('the marks', () => {
  it('give every mark its own shape and its name from the words module', () => {
    expect(new Set(marks.map((m) => MARKS[m].shape)).size).toBe(marks.length);
    for (const m of marks) expect(MARKS[m].label).toBe(MARK_WORD[m]);
  });

  it("are the colours the app's style sheet gives the marks, on light and dark grounds", () => {
    const css = readFileSync(new URL('../../app/globals.css', import.meta.url), 'utf8');
    for (const m of marks) expect(css).toContain(`--mark-${m}: light-dark(${MARKS[m].colour}, ${MARKS[m].colourDark});`);
  });

  it('keep the light marginal apart from the dark in and out in grey, which their shapes tell apart', () => {
    // (L1 + 0.05) / (L2 + 0.05), WCAG 2.1's contrast ratio; the saffron is more than 2.5 times as light (not the
    // 3:1 WCAG asks of graphics against their ground: that is the ground's job, the map's near-white)
    const ratio = (a: Mark, b: Mark) => (luminance(MARKS[a].colour) + 0.05) / (luminance(MARKS[b].colour) + 0.05);
    expect(ratio('marginal', 'in')).toBeGreaterThan(2.5);
    expect(ratio('marginal', 'out')).toBeGreaterThan(2.5);
    // in and out are both dark: a filled disc against a square with a cross, never the same outline
    expect(MARKS.in.shape).toBe('disc');
    expect(MARKS.out.shape).toBe('crossed-square');
    expect(markLayers('out', 1).some((l) => l.stroke === 'ground')).toBe(true);
  });

  it('draw as path data any SVG reader takes, scaled by the radius', () => {
    for (const m of marks) {
      const small = markLayers(m, 1), big = markLayers(m, 10);
      expect(small.length).toBe(big.length);
      for (const l of big) expect(l.d).toMatch(/^M [-\d. ALMZ]+$/);
      const svg = markSvg(m, 5, 6, 3, '#ffffff');
      expect(svg).toContain(`data-mark="${m}"`);
      if (big.some((l) => l.fill === 'mark' || l.stroke === 'mark')) expect(svg).toContain(MARKS[m].colour);
    }
  });
});
