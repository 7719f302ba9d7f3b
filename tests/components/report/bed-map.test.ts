import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { BedMap } from '@/components/report/BedMap';
import type { MapItem } from '@/lib/report/map-items';

// A 600 × 400 mm plate of two 200 mm-deep strips, positions on 50 mm from 25 mm in: the first row of each strip
// lies half a pitch from the strip's back edge, where its name and move are written.
const items: MapItem[] = [0, 1, 2, 3].flatMap((row) => [0, 1, 2].map((col) => ({
  key: `p${row}${col}`, label: `p${row}${col}`, x: 25 + col * 50, y: 25 + row * 50, dx: 0.1, dy: -0.05, mark: 'in' as const, title: 'in',
})));
const panels = [
  { id: 'S1', x: 0, y: 0, width: 600, height: 200, note: '-0.12, 0.10 mm · 0.003°' },
  { id: 'S2', x: 0, y: 200, width: 600, height: 200, note: '+0.12, 0.10 mm · 0.003°' },
];

describe('the deviation map', () => {
  it("writes each panel's name and move on one line after every mark, so no mark of the first row covers them", () => {
    const svg = renderToStaticMarkup(createElement(BedMap, {
      widthMm: 600, heightMm: 400, originX: 0, originY: 0, panels, items, spacingMm: 50, markRadiusMm: 8, exaggeration: 100, unit: 'mm', label: 'map',
    }));
    const lastMark = svg.lastIndexOf('data-mark=');
    for (const q of panels) {
      const at = svg.indexOf(`data-panel="${q.id}"`);
      expect(at).toBeGreaterThan(lastMark);
      const text = svg.slice(svg.lastIndexOf('<text', at), svg.indexOf('</text>', at));
      expect(text).toContain(`>${q.id}</tspan>`);
      expect(text).toContain(q.note);
      // SVG paints in document order: a label painted later stays readable over the marks
      expect(text).toContain('pointer-events="none"');
    }
  });
});
