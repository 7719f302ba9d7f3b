/**
 * A bed's checks table in the user's length unit, rendered with react-dom/server: the headings name the unit and
 * the figures are converted at 25.4 mm to the inch (exact by definition, NIST SP 811 appendix B), to 0.0001 in
 * (tenths, common practice in inch shops) or 0.01 mm.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { BedChecksTable } from '@/components/BedChecksTable';
import type { CheckListRow } from '@/db/queries/beds';

const row: CheckListRow = {
  id: 'c1', bedId: 'b1', title: 'After resurfacing', status: 'done', verdict: 'fail', rmsMm: 0.254, maxMm: 1.27, outCount: 3,
  createdAt: Date.UTC(2026, 11, 2, 8, 0), finishedAt: Date.UTC(2026, 11, 2, 8, 1),
};
const html = (unit: 'mm' | 'in') => renderToStaticMarkup(createElement(BedChecksTable, { checks: [row], unit }));

describe('the bed page checks table', () => {
  it('gives an inch user RMS and worst in inches, with the unit in the headings', () => {
    const out = html('in');
    expect(out).toContain('RMS, in');
    expect(out).toContain('Worst, in');
    expect(out).not.toContain(', mm');
    // 0.254 mm / 25.4 = 0.0100 in; 1.27 mm / 25.4 = 0.0500 in
    expect(out).toContain('>0.0100<');
    expect(out).toContain('>0.0500<');
  });

  it('gives a millimetre user the figures to 0.01 mm', () => {
    const out = html('mm');
    expect(out).toContain('RMS, mm');
    expect(out).toContain('>0.25<');
    expect(out).toContain('>1.27<');
  });

  it('shows a dash for a check not measured yet', () => {
    const out = renderToStaticMarkup(createElement(BedChecksTable, { checks: [{ ...row, status: 'queued', verdict: null, rmsMm: null, maxMm: null, outCount: null }], unit: 'in' }));
    expect(out.match(/>—</g)?.length).toBe(3);
  });
});
