/**
 * Loading a finished check for the sharing, comment, fit and PDF use cases, and the report as a stranger may
 * see. `publicReport` keeps only what the report page shows (the bed's outline and panels, verdict, positions,
 * panels' moves, seams, lattice, summary) and drops everything that comes from the photo rather than the bed: the camera (focal length,
 * possibly from EXIF, and the principal point, which gives the image size), the detector's diagnostics, the
 * unmatched detections (image pixels) and any field a later version adds.
 */
import type { Db } from '@/db/client';
import { getBed } from '@/db/queries/beds';
import { getCheck, type CheckRow } from '@/db/queries/checks';
import { getPattern } from '@/db/queries/patterns';
import { PatternSchema, ReportSchema, type Report } from '@/lib/geometry/contract';
import { parseStoredJson } from '@/lib/stored-json';
import { patternToMm, type PatternMm } from '@/lib/geometry/units';
import { AppError, notFound } from '@/lib/http/errors';
import { withOutline } from '@/lib/report/map';
import { fitFamilies, type FitFamily } from '@/lib/report/method-note';

export interface FinishedCheck {
  check: CheckRow;
  report: Report;
  bedName: string;
}

/** A check of the workshop whose report is ready (done or needs review); 404 / 409 otherwise. */
export async function loadFinishedCheck(db: Db, workshopId: string, checkId: string): Promise<FinishedCheck> {
  const check = await getCheck(db, workshopId, checkId);
  if (!check) throw notFound('check');
  if (!check.reportJson || (check.status !== 'done' && check.status !== 'needs-review')) {
    throw new AppError('not_ready', 409, `The check is ${check.status}; its report is ready once it is done.`);
  }
  const [bed, report] = await Promise.all([getBed(db, workshopId, check.bedId), withStoredOutline(db, check, ReportSchema.parse(JSON.parse(check.reportJson)))]);
  return { check, report, bedName: bed?.name ?? 'Bed' };
}

/**
 * The report with its bed's outline and panels: reports carry them since they are written (lib/checks/run-analysis),
 * an older one takes them from the pattern it was measured against, when that still exists.
 */
export async function withStoredOutline(db: Db, check: Pick<CheckRow, 'bedId' | 'patternId'>, report: Report): Promise<Report> {
  if (report.pattern.bed) return report;
  const pattern = parseStoredJson((await getPattern(db, check.bedId, check.patternId))?.json, PatternSchema);
  return pattern ? withOutline(report, patternToMm(pattern)) : report;
}

/** The families of the pattern the check was measured against, for the method note (lib/report/method-note.ts); null when the pattern is gone. */
export async function loadFitFamilies(db: Db, check: Pick<CheckRow, 'bedId' | 'patternId'>): Promise<FitFamily[] | null> {
  const pattern = parseStoredJson((await getPattern(db, check.bedId, check.patternId))?.json, PatternSchema);
  return fitFamilies(pattern ? patternToMm(pattern) : null);
}

/** The pattern (in mm) the check was measured against. */
export async function loadCheckPattern(db: Db, check: CheckRow): Promise<PatternMm> {
  const row = await getPattern(db, check.bedId, check.patternId);
  if (!row) throw notFound('pattern');
  return patternToMm(PatternSchema.parse(JSON.parse(row.json)));
}

/** The report without anything of the photo: what a share link serves. */
export function publicReport(r: Report): Report {
  return {
    version: r.version,
    units: r.units,
    // the bed's outline and panels (the bed, not the photo) for the maps
    pattern: { name: r.pattern.name, ...(r.pattern.units ? { units: r.pattern.units } : {}), ...(r.pattern.bed ? { bed: { width: r.pattern.bed.width, height: r.pattern.bed.height } } : {}),
      ...(r.pattern.panels ? { panels: r.pattern.panels.map((q) => ({ id: q.id, x: q.x, y: q.y, width: q.width, height: q.height })) } : {}) },
    positions: r.positions.map((p) => ({
      family: p.family, col: p.col, row: p.row, label: p.label, panel: p.panel, nominal: p.nominal, measured: p.measured,
      deviation: p.deviation, uncertaintyMm: p.uncertaintyMm, toleranceMm: p.toleranceMm, verdict: p.verdict, ...(p.hidden ? { hidden: true } : {}), ...(p.hiddenBy ? { hiddenBy: p.hiddenBy } : {}), ...(p.outOfView ? { outOfView: true } : {}),
      ...(p.form ? { form: { dx: p.form.dx, dy: p.form.dy, r: p.form.r, uncertaintyMm: p.form.uncertaintyMm, verdict: p.form.verdict } } : {}),
    })),
    unmatched: [],
    panels: r.panels.map((q) => ({ id: q.id, dx: q.dx, dy: q.dy, rotationDeg: q.rotationDeg, positions: q.positions, uncertaintyMm: q.uncertaintyMm, ...(q.rotationUncertaintyDeg !== undefined ? { rotationUncertaintyDeg: q.rotationUncertaintyDeg } : {}), correction: q.correction })),
    seams: r.seams.map((s) => ({ a: s.a, b: s.b, dx: s.dx, dy: s.dy, r: s.r, uncertaintyMm: s.uncertaintyMm })),
    lattice: {
      rotationDeg: r.lattice.rotationDeg, scaleX: r.lattice.scaleX, scaleY: r.lattice.scaleY, squarenessDeg: r.lattice.squarenessDeg,
      observed: r.lattice.observed, ...(r.lattice.reason ? { reason: r.lattice.reason } : {}),
      uncertainty: { rotationDeg: r.lattice.uncertainty.rotationDeg, scaleX: r.lattice.uncertainty.scaleX, scaleY: r.lattice.uncertainty.scaleY, squarenessDeg: r.lattice.uncertainty.squarenessDeg },
      ...(r.lattice.shapeCheck ? { shapeCheck: { ...r.lattice.shapeCheck } } : {}),
    },
    // The contract requires a camera; a shared report carries neutral values, not the photo's.
    camera: { focalPx: 0, k1: 0, k2: 0 },
    summary: { matched: r.summary.matched, missing: r.summary.missing, rmsMm: r.summary.rmsMm, maxMm: r.summary.maxMm, out: r.summary.out, marginal: r.summary.marginal, verdict: r.summary.verdict, sentence: r.summary.sentence,
      ...(r.summary.formOut !== undefined ? { formOut: r.summary.formOut } : {}), ...(r.summary.formMarginal !== undefined ? { formMarginal: r.summary.formMarginal } : {}),
      ...(r.summary.shapeSentence ? { shapeSentence: r.summary.shapeSentence } : {}) },
    // Measured distances between positions given with the check: labels and lengths, nothing of the photo.
    ...(r.distances ? { distances: r.distances.map((d) => ({ ...d })) } : {}),
  };
}
