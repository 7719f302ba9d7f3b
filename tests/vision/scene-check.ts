/** Shared body of the rendered-scene tests (split over two files so that two workers share them). */
import { expect, it } from 'vitest';
import { detectFromImage } from '@/lib/vision';
import { synthesize } from '@/lib/vision/render';
import { SCENES, SMALL_BED } from './scenes';
import { scoreDetections } from './score';

export function sceneTests(part: 0 | 1): void {
  SCENES.filter((_, i) => i % 2 === part).forEach((c) => {
    it(`finds every visible hole to a small fraction of a pixel: ${c.name}`, async () => {
      const { jpeg, truth } = await synthesize(SMALL_BED, c.options);
      const { points, meta } = await detectFromImage(jpeg, SMALL_BED, { referenceMm: truth.target.sizeMm });
      const s = scoreDetections(points, truth);
      // Truth: the renderer's exact projection of each true centre (camera.ts). Thresholds for 1.1 MP scenes
      // (holes 14 px across); the 12 MP targets (≤ 0.05 px RMS) are measured by the bench.
      expect(meta.square.kind).toBe('target');
      expect(meta.square.markFound).toBe(true);
      expect(s.cornerRmsPx).toBeLessThan(0.15);
      expect(s.foundFraction).toBeGreaterThanOrEqual(0.97);
      expect(s.falseDetections).toBe(0);
      expect(s.rmsPx).toBeLessThan(0.1);
    });
  });
}
