/**
 * The note a report carries when its photo had problems (lib/report/photo-note.ts): every issue code of the report
 * contract is named, and a photo without problems gets no note.
 */
import { describe, expect, it } from 'vitest';
import { PHOTO_ISSUE_CODES, type PhotoQuality } from '@/lib/geometry/contract';
import { ISSUE_WORDS, photoNote } from '@/lib/report/photo-note';

const q = (codes: (typeof PHOTO_ISSUE_CODES)[number][]): PhotoQuality => ({
  issues: codes.map((code) => ({ code, message: `measured ${code}`, advice: 'do this' })),
  predicted: { positionMm: 0.03, scalePpm: 120 },
  measured: { widthPx: 4000, heightPx: 3000, edgeSpreadPx: 2, defocusSigmaPx: 0.7, motion: null, targetSidePx: 600, holeDiameterPx: 20, tiltDeg: 4, clipped: null, whiteLevel: 230, holesSampled: 30 },
  timeMs: 100,
});

describe('photo note of a report', () => {
  it('is absent for a photo without problems and for a report without the quality stage', () => {
    expect(photoNote(q([]))).toBeNull();
    expect(photoNote(undefined)).toBeNull();
  });
  it('names one problem and says the figures carry it', () => {
    expect(photoNote(q(['overexposed']))).toBe('Measured from a photo with a problem: over-exposure. These figures carry it; take a better photo before you move or remachine anything on them.');
  });
  it('lists several problems, and has words for every code of the contract', () => {
    expect(photoNote(q(['blurred', 'motion-blur', 'tilted']))).toMatch(/^Measured from a photo with problems: blur \(out of focus\), camera shake and a slanted view\. These figures carry them;/);
    for (const c of PHOTO_ISSUE_CODES) expect(ISSUE_WORDS[c]).toBeTruthy();
    // no figure of the photo leaks into the words (a shared page shows none)
    expect(photoNote(q([...PHOTO_ISSUE_CODES]))).not.toMatch(/\d/);
  });
});
