/**
 * The photo guide's examples (components/guide/PhotoExamples.tsx): one for every issue code of the report contract,
 * each with its good and bad picture committed in public/guide (drawn by `npm run guide-images`, which checks that
 * the quality stage gives each bad one its code), small enough for a phone on a shop's connection, and each read as
 * WebP (RIFF … WEBP header: Google's WebP container specification).
 */
import { readFileSync, statSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { PHOTO_EXAMPLES } from '@/components/guide/PhotoExamples';
import { PHOTO_ISSUE_CODES } from '@/lib/geometry/contract';

const file = (name: string) => new URL(`../../../public/guide/${name}.webp`, import.meta.url);

describe('photo guide examples', () => {
  it('shows a good and a bad example for every issue code', () => {
    expect(PHOTO_EXAMPLES.map((e) => e.code).sort()).toEqual([...PHOTO_ISSUE_CODES].sort());
    for (const e of PHOTO_EXAMPLES) {
      for (const name of [e.code, e.good]) {
        const bytes = readFileSync(file(name));
        expect(bytes.subarray(0, 4).toString('latin1')).toBe('RIFF');
        expect(bytes.subarray(8, 12).toString('latin1')).toBe('WEBP');
        expect(statSync(file(name)).size).toBeLessThanOrEqual(40 * 1024);
      }
    }
  });
});
