/**
 * Words of the photo-quality verdict. Sources: "±" is two standard deviations (about 95 % of a normal
 * distribution, common practice); a clearance is judged well at a 4:1 ratio of tolerance to measurement
 * uncertainty (common practice in calibration, from memory: ANSI/NCSL Z540.3's test uncertainty ratio).
 */
import { describe, expect, it } from 'vitest';
import type { PhotoQuality } from '@/lib/geometry/contract';
import { positionReach, qualityHeadline } from '@/components/check-status/quality-words';

const q = (positionMm: number, issues: PhotoQuality['issues'] = []): PhotoQuality => ({
  issues,
  predicted: { positionMm, scalePpm: 50 },
  measured: { widthPx: 4000, heightPx: 3000, edgeSpreadPx: 2, defocusSigmaPx: 0.7, motion: null, targetSidePx: 400, holeDiameterPx: 20, tiltDeg: 3, clipped: null, whiteLevel: 240, holesSampled: 40 },
  timeMs: 50,
});

describe('photo-quality words', () => {
  it('states positions to twice the 1σ and calls good the clearances four times that', () => {
    const r = positionReach(q(0.03))!;
    expect(r.plusMinusMm).toBeCloseTo(0.06, 12);
    expect(r.clearanceMm).toBeCloseTo(0.24, 12);
    expect(qualityHeadline(q(0.03))).toContain('± 0.060 mm');
    expect(qualityHeadline(q(0.03))).toContain('0.24 mm and more');
  });
  it('says a photo without a target cannot be measured, and counts the problems of one with issues', () => {
    expect(qualityHeadline({ ...q(0.03), predicted: null })).toMatch(/cannot be measured/);
    const two = q(0.05, [{ code: 'blurred', message: 'm', advice: 'a' }, { code: 'tilted', message: 'm', advice: 'a' }]);
    expect(qualityHeadline(two)).toMatch(/2 problems/);
  });
});
