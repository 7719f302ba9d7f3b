/**
 * The fit step bound to the measurement core (lib/geometry): what the re-fit job needs, and the fit half of
 * the full analysis (lib/checks/pipeline.ts adds vision).
 */
import { analyzePoints, GeometryInputError } from '@/lib/geometry';
import { runCheckRefit, type AnalysisDeps, type JobContext } from './run-analysis';

export const fitDeps: Pick<AnalysisDeps, 'analyze' | 'isInputError'> = {
  analyze: (points, pattern, options) => analyzePoints(points, pattern, options ?? {}),
  isInputError: (e) => e instanceof GeometryInputError,
};

/** The `check.refit` job: the check's edited detections → report. */
export function refitCheck(ctx: JobContext): Promise<void> {
  return runCheckRefit(ctx, fitDeps);
}
