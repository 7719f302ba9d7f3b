/**
 * The worker's jobs by kind. The analysis steps of `check.analyze` (photo → points → report) and
 * `check.refit` (points → report) run in the pool's analysis processes (workers/isolate.ts); the database
 * work around them stays in the worker.
 */
import { JOB_KINDS } from '@/db/queries/jobs';
import { runCheckAnalysis, runCheckRefit } from '@/lib/checks/run-analysis';
import type { AnalysisPool } from './isolate';
import { runProbe } from './probe';
import type { JobHandler } from './run';

export function workerHandlers(pool: AnalysisPool): Record<string, JobHandler> {
  return {
    [JOB_KINDS.probe]: runProbe,
    [JOB_KINDS.analyze]: (ctx) => runCheckAnalysis(ctx, pool.forJob(ctx.job, ctx.log)),
    [JOB_KINDS.refit]: (ctx) => runCheckRefit(ctx, pool.forJob(ctx.job, ctx.log)),
  };
}
