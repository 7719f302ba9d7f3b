/**
 * What the failed check's page offers, from the messages the worker really writes: photos drawn by the renderer
 * (lib/vision/render) measured by lib/vision. A pattern whose holes are much larger than the bed's finds no hole
 * although the square is found; a blank photo has no square; five holes are too few for the measurement core to fit.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { failureAdvice } from '@/components/check-status/stages';
import { PatternSchema, type Pattern } from '@/lib/geometry/contract';
import { analyzePoints } from '@/lib/geometry/analyze';
import { presetById } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { detectFromImage } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';

// M6 threaded inserts (6 mm bore, from memory) at 100 mm pitch, common practice
const bed = (holeDiameter: number): Pattern => PatternSchema.parse({
  version: 1, name: 'M6 at 100 mm', units: 'mm', bed: { width: 1200, height: 900 },
  families: [{ id: 'insert', kind: 'threaded-insert', holeDiameter, origin: { x: 50, y: 50 }, pitch: { x: 100, y: 100 }, count: { x: 12, y: 9 }, fit: { fastener: 'M6', clearance: 'medium' } }],
});

const failure = async (jpeg: Buffer, pattern: Pattern, referenceMm: number) => {
  try { await detectFromImage(jpeg, pattern, { referenceMm }); } catch (e) { return e as Error & { code?: string }; }
  throw new Error('the photo was measured');
};

describe('failureAdvice', () => {
  it('sends a photo where no hole was found to the bed pattern and another photo, not to marking the corners', async () => {
    const { jpeg, truth } = await synthesize(bed(6), { seed: 77, width: 1600, height: 1200, tiltDeg: 4, camera: 'phone' });
    // the pattern says 40 mm holes: the square is found, no hole of that size is
    const e = await failure(jpeg, bed(40), truth.target.sizeMm);
    expect(e.code).toBe('too-few-holes');
    expect(failureAdvice(e.message, true)).toEqual({ checkPattern: true, anotherPhoto: true, markCorners: false });
  }, 60_000);

  it('offers another photo when the square was not found, and marking the corners only once there are detections to edit', async () => {
    const blank = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: { r: 120, g: 110, b: 95 } } }).jpeg().toBuffer();
    const e = await failure(blank, bed(6), 250);
    expect(e.code).toBe('no-square');
    // a first analysis that failed stored no detections: review has nothing to edit
    expect(failureAdvice(e.message)).toEqual({ checkPattern: false, anotherPhoto: true, markCorners: false });
    // a re-fit's photo has them: its corners can be moved in review
    expect(failureAdvice(e.message, true)).toEqual({ checkPattern: false, anotherPhoto: true, markCorners: true });
  }, 60_000);

  it('offers the pattern, the corners and another photo when holes were found but too few fit the pattern', () => {
    const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
    const { points } = makeScene({ pattern, seed: 3 });
    let message = '';
    try { analyzePoints({ ...points, holes: points.holes.slice(0, 5) }, pattern); } catch (e) { message = (e as Error).message; }
    expect(message).toMatch(/holes/);
    expect(failureAdvice(message, true)).toEqual({ checkPattern: true, anotherPhoto: true, markCorners: true });
    expect(failureAdvice(message, false).markCorners).toBe(false);
  });

  it('offers only another photo for a file that is not a photo', async () => {
    const e = await failure(Buffer.from('not a photo at all'), bed(6), 250);
    expect(e.code).toBe('unreadable-image');
    expect(failureAdvice(e.message)).toEqual({ checkPattern: false, anotherPhoto: true, markCorners: false });
  });
});
