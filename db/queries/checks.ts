/**
 * Checks: one photo of one bed measured against the bed's pattern. Created with their analysis job in one
 * transaction; the worker reports stages on the row and writes the result (report, detections, positions,
 * panels, summary columns) in one transaction that also finishes the job under its lock token, so a job run
 * twice leaves one result and a worker that lost its lease writes nothing.
 *
 * Lengths in mm; detections in image px (the measurement core's Points format). No sessions here.
 */
import { and, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { checkPositions, checks, jobs, panelResults } from '@/db/schema';
import type { CheckStatus } from '@/db/schema';
import { PhotoQualitySchema, type PhotoQuality, type Points, type Report } from '@/lib/geometry/contract';
import { enqueueJob, finishJobInTx, JOB_KINDS, LeaseLostError, withBusyRetry, type Job } from './jobs';
import type { Db } from '@/db/client';
import { parseStoredJson } from '@/lib/stored-json';
import { newId, type Queryable } from './types';

export type CheckRow = typeof checks.$inferSelect;

/** Version of the analysis pipeline whose results a check holds; bump when results would change. */
export const ANALYSIS_VERSION = 1;

export interface NewCheckInput {
  workshopId: string;
  bedId: string;
  photoId: string;
  patternId: string;
  referenceMm: number;
  /** Reference corners in image px, or null to detect them. */
  corners: [[number, number], [number, number], [number, number], [number, number]] | null;
  /** Measured distances between positions given with the upload, or null. */
  distances?: { from: string; to: string; mm: number; sigmaMm: number }[] | null;
  title?: string | null;
  createdBy: string | null;
}

/** Inserts a queued check and its analysis job (call inside a transaction). */
export async function insertCheckWithJob(tx: Queryable, input: NewCheckInput, now = Date.now()): Promise<{ check: CheckRow; job: Job }> {
  const [check] = await tx.insert(checks).values({
    id: newId(),
    workshopId: input.workshopId,
    bedId: input.bedId,
    photoId: input.photoId,
    patternId: input.patternId,
    title: input.title ?? null,
    referenceMm: input.referenceMm,
    cornersJson: input.corners ? JSON.stringify(input.corners) : null,
    distancesJson: input.distances?.length ? JSON.stringify(input.distances) : null,
    status: 'queued',
    stage: 'waiting for a worker',
    progress: 0,
    analysisVersion: ANALYSIS_VERSION,
    createdBy: input.createdBy,
    createdAt: now,
    updatedAt: now,
  }).returning();
  if (!check) throw new Error('insertCheckWithJob: insert returned no row');
  const job = await enqueueJob(tx, { kind: JOB_KINDS.analyze, checkId: check.id, payload: { analysisVersion: ANALYSIS_VERSION } }, now);
  return { check, job };
}

/**
 * A check that already measures exactly this (photo, pattern, reference size, corners, distances) and has not failed:
 * uploading the same photo again with the same inputs returns it instead of queueing the same work twice.
 */
export async function findSameCheck(db: Queryable, input: Omit<NewCheckInput, 'title' | 'createdBy'>): Promise<CheckRow | undefined> {
  const corners = input.corners ? JSON.stringify(input.corners) : null;
  const distances = input.distances?.length ? JSON.stringify(input.distances) : null;
  const [row] = await db.select().from(checks).where(and(
    eq(checks.workshopId, input.workshopId),
    eq(checks.bedId, input.bedId),
    eq(checks.photoId, input.photoId),
    eq(checks.patternId, input.patternId),
    eq(checks.referenceMm, input.referenceMm),
    corners === null ? isNull(checks.cornersJson) : eq(checks.cornersJson, corners),
    distances === null ? isNull(checks.distancesJson) : eq(checks.distancesJson, distances),
    inArray(checks.status, ['queued', 'running', 'needs-review', 'done']),
    isNull(checks.editedAt),
  )).orderBy(desc(checks.createdAt)).limit(1);
  return row;
}

/** A check of the workshop (another workshop's check is "not found"). */
export async function getCheck(db: Queryable, workshopId: string, id: string): Promise<CheckRow | undefined> {
  const [row] = await db.select().from(checks).where(and(eq(checks.workshopId, workshopId), eq(checks.id, id))).limit(1);
  return row;
}

/**
 * What the report routes need before the report itself: status, error and the report's revision (bumped by a
 * trigger whenever report_json changes), scoped by workshop. The report text is not read (see getCheckReportText).
 */
/** 1 when a check has a report text, 0 otherwise, without reading the text (SQLite knows from the record header). */
export const hasReportSql = sql<number>`${checks.reportJson} is not null`;

export async function getCheckReportRef(db: Queryable, workshopId: string, id: string): Promise<{ id: string; status: CheckStatus; error: string | null; hasReport: boolean; reportRev: number } | undefined> {
  const [row] = await db
    .select({ id: checks.id, status: checks.status, error: checks.error, hasReport: hasReportSql, reportRev: checks.reportRev })
    .from(checks)
    .where(and(eq(checks.workshopId, workshopId), eq(checks.id, id)))
    .limit(1);
  return row && { ...row, hasReport: Boolean(row.hasReport) };
}

/** The stored report text of a check and its revision, scoped by workshop. */
export async function getCheckReportText(db: Queryable, workshopId: string, id: string): Promise<{ reportJson: string | null; reportRev: number } | undefined> {
  const [row] = await db
    .select({ reportJson: checks.reportJson, reportRev: checks.reportRev })
    .from(checks)
    .where(and(eq(checks.workshopId, workshopId), eq(checks.id, id)))
    .limit(1);
  return row;
}

/** A check by id alone, for the worker. */
export async function getCheckById(db: Queryable, id: string): Promise<CheckRow | undefined> {
  const [row] = await db.select().from(checks).where(eq(checks.id, id)).limit(1);
  return row;
}

/** What `GET /api/checks/{id}` answers. */
export interface CheckStatusView {
  id: string;
  bedId: string;
  status: CheckStatus;
  stage: string | null;
  /** 0…1 */
  progress: number;
  error?: string;
  verdict: string | null;
  createdAt: number;
  finishedAt: number | null;
  /** The photo-quality verdict, once the worker has measured it (before the holes). */
  quality?: PhotoQuality;
  /** True once detections are stored (an analysis got through the vision), so review can edit them. */
  hasDetections: boolean;
}

export function checkStatusView(row: CheckRow): CheckStatusView {
  const quality = parseStoredJson(row.qualityJson, PhotoQualitySchema) ?? undefined;
  return {
    id: row.id,
    bedId: row.bedId,
    status: row.status,
    stage: row.stage,
    progress: row.progress,
    ...(row.error ? { error: row.error } : {}),
    verdict: row.verdict,
    createdAt: row.createdAt,
    finishedAt: row.finishedAt,
    ...(quality ? { quality } : {}),
    hasDetections: row.detectionsJson !== null,
  };
}

const heldBy = (jobId: string, token: string) =>
  sql`EXISTS (SELECT 1 FROM jobs j WHERE j.id = ${jobId} AND j.lock_token = ${token} AND j.status = 'running')`;

/**
 * Reports the worker's stage and progress (0…1) on the check, only while the job is still held with `token`
 * (a worker that lost its lease cannot overwrite the new holder's progress). Returns false when not held.
 */
export async function setCheckStage(db: Db, checkId: string, held: { jobId: string; token: string }, stage: string, progress: number, now = Date.now()): Promise<boolean> {
  const rows = await withBusyRetry('report progress', () => db.update(checks)
    .set({ status: 'running', stage, progress: Math.max(0, Math.min(1, progress)), error: null, updatedAt: now })
    .where(and(eq(checks.id, checkId), heldBy(held.jobId, held.token)))
    .returning({ id: checks.id }), { db });
  return rows.length === 1;
}

/** Stores the photo-quality verdict on the check while the job is held with `token`. Returns false when not held. */
export async function setCheckQuality(db: Db, checkId: string, held: { jobId: string; token: string }, quality: PhotoQuality, now = Date.now()): Promise<boolean> {
  const json = JSON.stringify(PhotoQualitySchema.parse(quality));
  const rows = await withBusyRetry('store photo quality', () => db.update(checks)
    .set({ qualityJson: json, updatedAt: now })
    .where(and(eq(checks.id, checkId), heldBy(held.jobId, held.token)))
    .returning({ id: checks.id }), { db });
  return rows.length === 1;
}

export interface AnalysisResult {
  checkId: string;
  jobId: string;
  token: string;
  analysisVersion: number;
  detections: Points;
  report: Report;
  /** `needs-review` when the fit holds but a person should look before trusting it. */
  status: Extract<CheckStatus, 'done' | 'needs-review'>;
  /** Why it needs review (shown as the check's stage), when it does. */
  reviewReason?: string | null;
  now?: number;
}

const CHUNK = 400;

/**
 * Writes a finished analysis in ONE transaction that also finishes the job under its token: the previous
 * result rows of the check are replaced, so running the job twice leaves one result. Throws `LeaseLostError`
 * (and writes nothing) when the job is no longer held with `token`.
 */
export async function saveAnalysisResult(db: Db, r: AnalysisResult): Promise<void> {
  const now = r.now ?? Date.now();
  const s = r.report.summary;
  await withBusyRetry('save the analysis result', () => db.transaction(async (tx) => {
    if (!(await finishJobInTx(tx, r.jobId, r.token, now))) throw new LeaseLostError(r.jobId);
    await tx.delete(checkPositions).where(eq(checkPositions.checkId, r.checkId));
    await tx.delete(panelResults).where(eq(panelResults.checkId, r.checkId));
    const positionRows = r.report.positions.map((p) => ({
      checkId: r.checkId,
      family: p.family,
      col: p.col,
      row: p.row,
      label: p.label,
      panelId: p.panel,
      nominalXMm: p.nominal.x,
      nominalYMm: p.nominal.y,
      measuredXMm: p.measured?.x ?? null,
      measuredYMm: p.measured?.y ?? null,
      dxMm: p.deviation?.dx ?? null,
      dyMm: p.deviation?.dy ?? null,
      rMm: p.deviation?.r ?? null,
      uncertaintyMm: p.uncertaintyMm,
      verdict: p.verdict,
    }));
    for (let i = 0; i < positionRows.length; i += CHUNK) await tx.insert(checkPositions).values(positionRows.slice(i, i + CHUNK));
    const panelRows = r.report.panels.map((p) => ({
      checkId: r.checkId, panelId: p.id, dxMm: p.dx, dyMm: p.dy, rotationDeg: p.rotationDeg, positions: p.positions, uncertaintyMm: p.uncertaintyMm,
    }));
    for (let i = 0; i < panelRows.length; i += CHUNK) await tx.insert(panelResults).values(panelRows.slice(i, i + CHUNK));
    await tx.update(checks).set({
      status: r.status,
      stage: r.status === 'needs-review' ? (r.reviewReason ?? 'needs review') : null,
      progress: 1,
      error: null,
      analysisVersion: r.analysisVersion,
      detectionsJson: JSON.stringify(r.detections),
      reportJson: JSON.stringify(r.report),
      verdict: s.verdict,
      rmsMm: s.rmsMm,
      maxMm: s.maxMm,
      outCount: s.out,
      matchedCount: s.matched,
      missingCount: s.missing,
      updatedAt: now,
      finishedAt: now,
    }).where(eq(checks.id, r.checkId));
  }), { db });
}

export class CheckStateError extends Error {
  constructor(readonly code: 'not-found' | 'busy' | 'no-detections', message: string) {
    super(message);
    this.name = 'CheckStateError';
  }
}

export interface RefitInput {
  workshopId: string;
  checkId: string;
  userId: string;
  /** The edited detections (image px), validated by the caller with PointsSchema. */
  detections: Points;
  /** What was changed, for the record (moved corners, added/removed holes…). */
  edits: unknown;
}

/**
 * Stores a reviewer's edited detections on the check (with who and when) and queues a re-fit job (fit only,
 * no vision) in one transaction. Refuses while the check already has a job queued or running.
 */
export async function requestRefit(db: Db, input: RefitInput, now = Date.now()): Promise<{ check: CheckRow; job: Job }> {
  return withBusyRetry('queue a re-fit', () => db.transaction(async (tx) => {
    const check = await getCheck(tx, input.workshopId, input.checkId);
    if (!check) throw new CheckStateError('not-found', 'No such check.');
    const [active] = await tx.select({ id: jobs.id }).from(jobs)
      .where(and(eq(jobs.checkId, check.id), inArray(jobs.status, ['queued', 'running']))).limit(1);
    if (active) throw new CheckStateError('busy', 'This check is still being analysed; wait until it finishes, then re-fit.');
    const [row] = await tx.update(checks).set({
      detectionsJson: JSON.stringify(input.detections),
      editsJson: JSON.stringify(input.edits ?? null),
      editedBy: input.userId,
      editedAt: now,
      status: 'queued',
      stage: 'waiting for a worker',
      progress: 0,
      error: null,
      updatedAt: now,
    }).where(eq(checks.id, check.id)).returning();
    if (!row) throw new CheckStateError('not-found', 'No such check.');
    const job = await enqueueJob(tx, { kind: JOB_KINDS.refit, checkId: check.id, payload: { analysisVersion: ANALYSIS_VERSION } }, now);
    return { check: row, job };
  }), { db });
}
