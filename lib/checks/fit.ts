/**
 * The fit step bound to the measurement core (lib/geometry): what the re-fit job needs, and the fit half of
 * the full analysis (lib/checks/pipeline.ts adds vision). Run inside the worker's analysis process.
 */
import { analyzePoints, GeometryInputError } from '@/lib/geometry';
import type { AnalysisDeps } from './run-analysis';

export const fitDeps: Pick<AnalysisDeps, 'analyze' | 'isInputError'> = {
  analyze: (points, pattern, options) => analyzePoints(points, pattern, options ?? {}),
  isInputError: (e) => e instanceof GeometryInputError,
};
