/**
 * The full analysis bound to lib/vision (photo → points) and lib/geometry (points → report), as the worker's
 * analysis process (workers/analysis-child.ts) runs it for the `check.analyze` and `check.refit` jobs.
 */
import { detectFromImage, VisionInputError } from '@/lib/vision';
import { fitDeps } from './fit';
import type { AnalysisDeps } from './run-analysis';

export const analysisDeps: AnalysisDeps = {
  detect: async (bytes, o) => {
    const { points } = await detectFromImage(bytes, o.pattern, {
      referenceMm: o.referenceMm,
      ...(o.corners ? { corners: o.corners } : {}),
      ...(o.onStage ? { onStage: o.onStage } : {}),
      ...(o.onQuality ? { onQuality: o.onQuality } : {}),
    });
    return points;
  },
  analyze: fitDeps.analyze,
  isInputError: (e) => e instanceof VisionInputError || fitDeps.isInputError(e),
};

/**
 * Loads what the first analysis would otherwise load inside the job: opencv-wasm (compiled once per process,
 * its module reused by every job), the vision and fit code, and one tiny sharp decode. Called at worker start.
 */
export async function warmAnalysis(): Promise<void> {
  const { getCv, matFromGrey } = await import('@/lib/vision/cv');
  const { cv } = await getCv();
  const src = matFromGrey(cv, new Uint8Array(32 * 32).fill(128), 32, 32);
  const bin = new cv.Mat();
  try {
    cv.adaptiveThreshold(src, bin, 255, cv.ADAPTIVE_THRESH_MEAN_C, cv.THRESH_BINARY_INV, 11, 8);
  } finally {
    src.delete();
    bin.delete();
  }
  const sharp = (await import('sharp')).default;
  await sharp({ create: { width: 8, height: 8, channels: 3, background: '#808080' } }).jpeg().toBuffer().then((b) => sharp(b).raw().toBuffer());
}
