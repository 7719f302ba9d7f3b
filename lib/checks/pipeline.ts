/**
 * The full analysis bound to lib/vision (photo → points) and lib/geometry (points → report): the `check.analyze`
 * job of the worker.
 */
import { detectFromImage, VisionInputError } from '@/lib/vision';
import { fitDeps } from './fit';
import { runCheckAnalysis, type AnalysisDeps, type JobContext } from './run-analysis';

export const analysisDeps: AnalysisDeps = {
  detect: async (bytes, o) => {
    const { points } = await detectFromImage(bytes, o.pattern, {
      referenceMm: o.referenceMm,
      ...(o.corners ? { corners: o.corners } : {}),
      ...(o.onStage ? { onStage: o.onStage } : {}),
    });
    return points;
  },
  analyze: fitDeps.analyze,
  isInputError: (e) => e instanceof VisionInputError || fitDeps.isInputError(e),
};

/** The `check.analyze` job: the check's photo → report. */
export function analyzeCheck(ctx: JobContext): Promise<void> {
  return runCheckAnalysis(ctx, analysisDeps);
}
