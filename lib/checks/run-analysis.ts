/**
 * The worker's analysis of one check: load the photo from storage → find the reference square and the holes
 * (vision) → fit them to the bed's pattern (measurement core) → write the report, detections, positions,
 * panels and summary in ONE transaction that also finishes the job under its token (db/queries/checks.ts).
 * Stages reported on the check: 'reading photo', 'finding square', 'finding holes', 'fitting', with progress.
 *
 * The re-fit (after review edits) skips vision: the check's stored, user-edited detections are fitted again.
 *
 * Vision and fit are given as `AnalysisDeps` (bound to lib/vision and lib/geometry in lib/checks/pipeline.ts),
 * which keeps this module about order, progress, errors and storage of results.
 */
import { setTimeout as delay } from 'node:timers/promises';
import { ZodError } from 'zod';
import type { Db } from '@/db/client';
import { ANALYSIS_VERSION, getCheckById, saveAnalysisResult, setCheckQuality, setCheckStage } from '@/db/queries/checks';
import { LeaseLostError, type ClaimedJob } from '@/db/queries/jobs';
import { getPattern } from '@/db/queries/patterns';
import { getPhotoById, setPhotoSize } from '@/db/queries/photos';
import { MeasuredDistancesSchema, PatternSchema, PointsSchema, type MeasuredDistance, type Pattern, type Points, type Report, type PhotoQuality } from '@/lib/geometry/contract';
import { parseStoredJson } from '@/lib/stored-json';
import { patternToMm } from '@/lib/geometry/units';
import { withOutline } from '@/lib/report/map';
import { BlobNotFoundError, type Storage } from '@/lib/storage';
import { CornersSchema, type Corners } from './intake';
import { needsReview } from './review';

/** Progress (0…1) at which each stage starts; the stage runs until the next one starts. */
export const STAGES = {
  'reading photo': 0.02,
  'finding square': 0.15,
  'finding holes': 0.4,
  fitting: 0.85,
} as const;
export type Stage = keyof typeof STAGES;

export interface DetectOptions {
  /** The bed's nominal pattern (hole families and their diameters tell vision what to look for). */
  pattern: Pattern;
  /** Measured side of the reference square, mm. */
  referenceMm: number;
  /** User-marked reference corners in image px, or null to find the square. */
  corners: Corners | null;
  /** Called by vision as it moves on; `fraction` (0…1) is progress within the stage when known. */
  onStage?: (stage: string, fraction?: number) => void;
  /** Called with the photo-quality verdict before the holes are sought; awaited (the worker stores it first). */
  onQuality?: (quality: PhotoQuality) => Promise<void>;
}

/** What the fit takes besides the points and the pattern: the measured distances given with the check. */
export interface FitOptions { distances?: MeasuredDistance[] }

export interface AnalysisDeps {
  /** Photo bytes → detected points (image px). */
  detect: (bytes: Buffer, options: DetectOptions) => Promise<Points>;
  /** Detected points + nominal pattern → report (bed mm). */
  analyze: (points: Points, pattern: Pattern, options?: FitOptions) => Report | Promise<Report>;
  /** True for vision's input errors (no square, unreadable image…), which another attempt cannot fix. */
  isInputError: (error: unknown) => boolean;
}

/** An error another attempt cannot fix: the job fails at once with this message for the person. */
export class PermanentJobError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'PermanentJobError';
  }
}

/**
 * The analysis process crashed or broke a limit (memory, time): retried like any passing failure; once no
 * attempt is left the check says `reason` ("ran out of memory (cap 1536 MB)", "took longer than 120 s").
 */
export class AnalysisLimitError extends Error {
  constructor(readonly reason: string) {
    super(`The analysis ${reason}.`);
    this.name = 'AnalysisLimitError';
  }

  /** What the check says when this was its last attempt (`attempts` made in all). */
  finalMessage(attempts: number): string {
    return `The analysis ${this.reason}${attempts > 1 ? `, on the last of ${attempts} attempts` : ''}. ` +
      'Try a photo with fewer megapixels (the whole bed and the square still in the frame), and upload it again.';
  }
}

export interface JobContext {
  db: Db;
  storage: Storage;
  job: ClaimedJob;
  /** Throws `LeaseLostError` once the worker no longer holds the job (checked between stages). */
  assertHeld: () => void;
  /** Test hook: pause this long after reading the photo (WORKER_TEST_DELAY_MS, never in production). */
  testDelayMs: number;
  /** The worker's log (one JSON line per event); each stage reached is logged as `job.stage`. */
  log?: (event: string, detail: Record<string, unknown>) => void;
}

/** Maps vision's stage names onto ours (anything about the square / the holes). */
function visionStage(name: string): Stage {
  const n = name.toLowerCase();
  if (n.includes('square') || n.includes('corner') || n.includes('reference')) return 'finding square';
  if (n.includes('hole') || n.includes('detect') || n.includes('blob')) return 'finding holes';
  if (n.includes('fit')) return 'fitting';
  return 'reading photo';
}

/** Progress of `stage` at `fraction` of the way through it. */
export function stageProgress(stage: Stage, fraction = 0): number {
  const order = Object.keys(STAGES) as Stage[];
  const start = STAGES[stage];
  const next = order[order.indexOf(stage) + 1];
  const end = next ? STAGES[next] : 0.98;
  return start + (end - start) * Math.max(0, Math.min(1, fraction));
}

async function loadInputs(ctx: JobContext) {
  const checkId = ctx.job.checkId;
  if (!checkId) throw new PermanentJobError('This job names no check.');
  const check = await getCheckById(ctx.db, checkId);
  if (!check) throw new PermanentJobError('The check was deleted before it could be analysed.');
  const patternRow = await getPattern(ctx.db, check.bedId, check.patternId);
  if (!patternRow) throw new PermanentJobError('The bed pattern this check was made against no longer exists. Upload the photo again.');
  let pattern: Pattern;
  try {
    pattern = PatternSchema.parse(JSON.parse(patternRow.json));
  } catch (e) {
    const detail = e instanceof ZodError ? e.issues.slice(0, 3).map((i) => `${i.path.join('.')}: ${i.message}`).join('; ') : 'not valid JSON';
    throw new PermanentJobError(`The bed's pattern has problems (${detail}). Fix the bed setup, then upload the photo again.`, { cause: e });
  }
  return { check, pattern };
}

/** Photo → points → report for the job's check. */
export async function runCheckAnalysis(ctx: JobContext, deps: AnalysisDeps): Promise<void> {
  const { check, pattern } = await loadInputs(ctx);
  const held = { jobId: ctx.job.id, token: ctx.job.lockToken };
  // progress writes are chained so they land in order; the chain is awaited before the result is saved
  let writes: Promise<unknown> = Promise.resolve();
  let last = -1;
  const report = (stage: Stage, fraction = 0) => {
    const p = stageProgress(stage, fraction);
    if (p < last) return; // never go backwards
    last = p;
    ctx.log?.('job.stage', { checkId: check.id, stage, progress: p });
    writes = writes.then(() => setCheckStage(ctx.db, check.id, held, stage, p)).catch(() => undefined);
  };

  report('reading photo');
  await writes;
  ctx.assertHeld();
  if (!check.photoId) throw new PermanentJobError('The photo of this check was deleted. Upload it again.');
  const photo = await getPhotoById(ctx.db, check.photoId);
  if (!photo) throw new PermanentJobError('The photo of this check was deleted. Upload it again.');
  let bytes: Buffer;
  try {
    bytes = await ctx.storage.getBytes(photo.storageKey);
  } catch (e) {
    if (e instanceof BlobNotFoundError) throw new PermanentJobError('The photo file is missing from storage. Upload the photo again.', { cause: e });
    throw e;
  }
  if (ctx.testDelayMs > 0) await delay(ctx.testDelayMs);
  ctx.assertHeld();

  const corners = check.cornersJson ? CornersSchema.parse(JSON.parse(check.cornersJson)) : null;
  report('finding square');
  let points: Points;
  let quality: PhotoQuality | undefined;
  // the quality verdict is stored as soon as it is known, so that the check's page shows it before the result
  const onQuality = async (q: PhotoQuality) => {
    quality = q;
    ctx.log?.('job.quality', { checkId: check.id, issues: q.issues.map((x) => x.code), predicted: q.predicted, ms: q.timeMs });
    await writes;
    await setCheckQuality(ctx.db, check.id, held, q).catch(() => undefined);
  };
  try {
    points = await deps.detect(bytes, { pattern, referenceMm: check.referenceMm, corners, onStage: (name, fraction) => report(visionStage(name), fraction), onQuality });
  } catch (e) {
    // vision's input errors already say what to do (another photo, mark the corners)
    if (deps.isInputError(e)) throw new PermanentJobError((e as Error).message, { cause: e });
    throw e;
  }
  points = PointsSchema.parse(points);
  ctx.assertHeld();
  await fitAndSave(ctx, deps, check.id, pattern, points, fitOptionsOf(check), corners !== null, report, () => writes, quality);
  await setPhotoSize(ctx.db, photo.id, points.image.width, points.image.height).catch(() => undefined);
}

/** The check's stored distances (parsed at upload; a row that no longer parses is fitted without them). */
function fitOptionsOf(check: { distancesJson: string | null }): FitOptions {
  const distances = parseStoredJson(check.distancesJson, MeasuredDistancesSchema);
  return distances?.length ? { distances } : {};
}

function withHint(message: string, cornersGiven: boolean): string {
  const hint = cornersGiven
    ? 'Check the marked corners, or try another photo taken straight from above in even light.'
    // the upload form cannot take corners (review can, once a check has detections): only the API's `corners` field
    : 'Try another photo taken straight from above in even light. (Through the API, the reference square\'s four corners can also be given with the upload, as `corners` in image px.)';
  return /[.!?]$/.test(message.trim()) ? `${message.trim()} ${hint}` : `${message.trim()}. ${hint}`;
}

/** Re-fit after review: the check's stored (edited) detections → report; no vision. */
export async function runCheckRefit(ctx: JobContext, deps: Pick<AnalysisDeps, 'analyze' | 'isInputError'>): Promise<void> {
  const { check, pattern } = await loadInputs(ctx);
  const held = { jobId: ctx.job.id, token: ctx.job.lockToken };
  if (!check.detectionsJson) throw new PermanentJobError('This check has no detections to fit yet. Mark the square and the holes in review first.');
  const parsed = PointsSchema.safeParse(JSON.parse(check.detectionsJson));
  if (!parsed.success) throw new PermanentJobError('The edited detections are not valid points. Open the review again and redo the edit.');
  let writes: Promise<unknown> = Promise.resolve();
  const report = (stage: Stage, fraction = 0) => {
    const p = stageProgress(stage, fraction);
    ctx.log?.('job.stage', { checkId: check.id, stage, progress: p });
    writes = writes.then(() => setCheckStage(ctx.db, check.id, held, stage, p)).catch(() => undefined);
  };
  if (ctx.testDelayMs > 0) await delay(ctx.testDelayMs);
  // The edited detections carry the corners the reviewer placed.
  await fitAndSave(ctx, deps, check.id, pattern, parsed.data, fitOptionsOf(check), true, report, () => writes);
}

async function fitAndSave(
  ctx: JobContext, deps: Pick<AnalysisDeps, 'analyze' | 'isInputError'>, checkId: string, pattern: Pattern, points: Points, options: FitOptions,
  cornersGiven: boolean, report: (stage: Stage, fraction?: number) => void, pending: () => Promise<unknown>, quality?: PhotoQuality,
) {
  report('fitting');
  let result: Report;
  try {
    result = await deps.analyze(points, pattern, options);
    // the report carries the photo's quality, so that its numbers are read with the photo's issues in view
    if (quality) result = { ...result, photo: { quality } };
    // and the bed's outline and panels, so that every map of it (web, PDF, mail, shared page) draws the same bed
    result = withOutline(result, patternToMm(pattern));
  } catch (e) {
    if (deps.isInputError(e) || (e as Error).name === 'GeometryInputError') throw new PermanentJobError(withHint((e as Error).message, cornersGiven), { cause: e });
    throw e;
  }
  await pending();
  ctx.assertHeld();
  const review = needsReview(result);
  await saveAnalysisResult(ctx.db, {
    checkId,
    jobId: ctx.job.id,
    token: ctx.job.lockToken,
    analysisVersion: ANALYSIS_VERSION,
    detections: points,
    report: result,
    status: review ? 'needs-review' : 'done',
    reviewReason: review,
  });
}

export { LeaseLostError };
