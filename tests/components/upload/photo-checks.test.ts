/**
 * The upload page's in-browser checks (components/upload/photo-checks.ts): the words for a photo's size, type, EXIF
 * orientation and focal length. The reach is a ratio of lengths: a bed's longer side over FILL of the photo's longer
 * side gives mm per px (a pinhole view straight down scales the bed uniformly: Hartley & Zisserman, ch. 6).
 */
import { describe, expect, it } from 'vitest';
import { CENTRE_PX, FILL, MIN_HOLE_PX, photoChecks, reachFromSize, type PhotoFacts } from '@/components/upload/photo-checks';

const bed = { widthMm: 1300, heightMm: 900, smallestHoleMm: 8 };
const facts = (o: Partial<PhotoFacts>): PhotoFacts => ({ type: 'image/jpeg', name: 'p.jpg', width: 4000, height: 3000, orientation: 1, focalMm: 5.4, focal35mm: 26, ...o });
const by = (f: PhotoFacts, code: string, b = bed) => photoChecks(f, b).find((c) => c.code === code)!;

describe('in-browser photo checks', () => {
  it('turns the photo size into the best-case reach: mm per px from the bed filling the frame', () => {
    const r = reachFromSize(4000, 3000, bed);
    expect(r.mmPerPx).toBeCloseTo(1300 / (FILL * 4000), 9);
    expect(r.plusMinusMm).toBeCloseTo(2 * CENTRE_PX * r.mmPerPx, 9);
    expect(r.holePx).toBeCloseTo(8 / r.mmPerPx, 9);
    // the photo's turn does not matter: the longer sides meet
    expect(reachFromSize(3000, 4000, bed).mmPerPx).toBeCloseTo(r.mmPerPx, 12);
  });

  it('says a full-resolution 12 MP photo of a 1.3 m bed is fine, and gives its ±', () => {
    const c = by(facts({}), 'resolution');
    expect(c.level).toBe('ok');
    expect(c.text).toMatch(/^This photo is 4000 × 3000 px: .*± 0\.0[0-9]+ mm/);
  });

  it('warns when a downscaled 1600 × 1200 copy leaves the holes under the limit, and says what to do', () => {
    const c = by(facts({ width: 1600, height: 1200 }), 'resolution');
    // 1300 mm over 0.9 × 1600 px = 0.90 mm/px: 8 mm holes ≈ 8.9 px, under 10
    expect(MIN_HOLE_PX).toBe(10);
    expect(c.level).toBe('warn');
    expect(c.text).toContain('1600 × 1200');
    expect(c.text).toMatch(/about 9 px across/);
    expect(c.text).toMatch(/step closer or use the full-resolution photo/i);
  });

  it('notes a missing orientation tag and a missing focal length, and a PNG', () => {
    expect(by(facts({ orientation: null }), 'orientation').level).toBe('note');
    expect(by(facts({ orientation: 6 }), 'orientation').level).toBe('ok');
    const f = by(facts({ focalMm: null, focal35mm: null }), 'focal');
    expect(f.level).toBe('note');
    expect(by(facts({ focal35mm: null }), 'focal').text).toContain('5.4 mm');
    expect(by(facts({ focal35mm: 26 }), 'focal').text).toContain('26 mm equivalent');
    expect(by(facts({ type: 'image/png' }), 'type').level).toBe('note');
    expect(by(facts({ type: 'application/pdf' }), 'type').level).toBe('warn');
  });

  it('says the size is unknown when the browser cannot decode the photo (a HEIC in most browsers)', () => {
    const c = by(facts({ type: 'image/heic', width: null, height: null }), 'resolution');
    expect(c.level).toBe('note');
    expect(by(facts({ type: 'image/heic' }), 'type').level).toBe('ok');
  });
});
