import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { MethodNote } from '@/components/report/MethodNote';
import { ISO_273 } from '@/lib/geometry/fits';
import { PRESETS } from '@/lib/geometry/presets';
import { patternToMm } from '@/lib/geometry/units';
import { fitFamilies } from '@/lib/report/method-note';

describe("the report's method note", () => {
  it("says for each family where its tolerance comes from, in the reader's unit, and how the fit tables were checked", () => {
    const pattern = patternToMm(PRESETS.find((p) => p.id === 'm6-50')!.size({ bedWidthMm: 800, bedHeightMm: 600, stripWidthMm: 200 }));
    const mm = renderToStaticMarkup(createElement(MethodNote, { families: fitFamilies(pattern), unit: 'mm' }));
    // ISO 273, M6 medium: 6.6 mm hole, (6.6 − 6)/2 = 0.3 mm radial
    expect(mm).toContain('M6 through a medium clearance hole of 6.60 mm (ISO 273), (hole − fastener)/2 = 0.30 mm');
    const m6 = ISO_273.find((r) => r.names.includes('M6'))!;
    expect(mm).toContain(m6.fromMemory ? 'that table row is from memory' : 'that table row was checked against published copies');
    expect(mm).toMatch(/\d+ of \d+ rows of the fit tables/);
    expect(mm).toContain('2.45 × the per-axis standard uncertainty σ');
    const inch = renderToStaticMarkup(createElement(MethodNote, { families: fitFamilies(pattern), unit: 'in' }));
    expect(inch).toMatch(/clearance hole of 0\.2\d+ in/);
  });

  it('says so when the pattern is gone', () => {
    expect(renderToStaticMarkup(createElement(MethodNote, { families: null, unit: 'mm' }))).toContain('no longer available');
  });
});
