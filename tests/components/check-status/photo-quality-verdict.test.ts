import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import type { PhotoQuality } from '@/lib/geometry/contract';
import { PhotoQualityVerdict } from '@/components/check-status/PhotoQualityVerdict';
import { PhotoNote } from '@/components/report/PhotoNote';
import { photoNote } from '@/lib/report/photo-note';

const overexposed: PhotoQuality = {
  issues: [{ code: 'overexposed', message: "Over-exposed: the target's white is burnt out.", advice: 'Switch off the flash.' }],
  predicted: { positionMm: 0.01, scalePpm: 85 },
  measured: { widthPx: 4000, heightPx: 3000, edgeSpreadPx: 1, defocusSigmaPx: 0.4, motion: null, targetSidePx: 400, holeDiameterPx: 16, tiltDeg: 2, clipped: null, whiteLevel: 255, holesSampled: 40 },
  timeMs: 50,
};

describe('the photo-quality verdict on a finished check', () => {
  it("names each problem and its advice, and leaves saying that the figures carry them to the report's note below, once", () => {
    const page = renderToStaticMarkup(createElement('div', null,
      createElement(PhotoQualityVerdict, { quality: overexposed, phase: 'settled', uploadHref: '/beds/b/upload' }),
      createElement(PhotoNote, { note: photoNote(overexposed) })));
    expect(page).toContain("Over-exposed: the target&#x27;s white is burnt out.");
    expect(page).toContain('Switch off the flash.');
    expect(page).toContain('Upload a better photo');
    expect(page.match(/carr(y|ies)/g)).toHaveLength(1);
  });
});
