/**
 * The measurement core's public contract, version 1: the nominal pattern of a bed, the detected points of a
 * photo, and the report. Everything that crosses a boundary (API, CLI, worker, database) is parsed with these
 * schemas.
 *
 * Frames:
 * - Bed frame: millimetres (or inches in a pattern whose `units` is "in"; converted once by `patternToMm`),
 *   origin at the front-left corner of the bed, +X to the right, +Y away from the operator.
 * - Image frame: pixels, origin at the top-left corner of the photo, +x right, +y down.
 */
import { z } from 'zod';

/** Millimetres per inch (exact, by definition). */
export const MM_PER_IN = 25.4;

/** The most nominal positions a pattern may have (all families together). */
export const MAX_POSITIONS = 20_000;

const finite = z.number().finite();
const positive = finite.positive();
export const Vec2Schema = z.object({ x: finite, y: finite });
export type Vec2 = z.infer<typeof Vec2Schema>;

export const HOLE_KINDS = ['threaded-insert', 'dog-hole', 'pin-hole', 'other'] as const;
export type HoleKind = (typeof HOLE_KINDS)[number];

export const CLEARANCE_CLASSES = ['fine', 'medium', 'coarse', 'close', 'normal', 'loose'] as const;
export type ClearanceClass = (typeof CLEARANCE_CLASSES)[number];

/** What fits in a family's holes, and so how far a hole may stray: one of three forms. */
export const FitSpecSchema = z.union([
  z.object({ toleranceMm: positive.max(50) }).strict(),
  z.object({ fastener: z.string().min(1).max(20), clearance: z.enum(CLEARANCE_CLASSES) }).strict(),
  z.object({ pinDiameter: positive }).strict(),
]);
export type FitSpec = z.infer<typeof FitSpecSchema>;

export const FamilySchema = z.object({
  id: z.string().min(1).max(40).regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, - and _ only'),
  kind: z.enum(HOLE_KINDS),
  /** Human name for labels, e.g. "insert" or "dog"; defaults from kind. */
  label: z.string().min(1).max(30).optional(),
  holeDiameter: positive,
  /** Centre of the family's position (col 0, row 0), in the bed frame. */
  origin: Vec2Schema,
  pitch: z.object({ x: positive, y: positive }),
  count: z.object({ x: z.number().int().min(1).max(2000), y: z.number().int().min(1).max(2000) }),
  fit: FitSpecSchema,
});
export type Family = z.infer<typeof FamilySchema>;

export const RectSchema = z.object({ x: finite, y: finite, width: positive, height: positive });
export type Rect = z.infer<typeof RectSchema>;

export const PanelSchema = RectSchema.extend({
  id: z.string().min(1).max(40).regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, - and _ only'),
});
export type Panel = z.infer<typeof PanelSchema>;

export const PatternSchema = z
  .object({
    version: z.literal(1),
    name: z.string().min(1).max(120),
    units: z.enum(['mm', 'in']),
    bed: z.object({ width: positive, height: positive }),
    families: z.array(FamilySchema).min(1).max(8),
    panels: z.array(PanelSchema).max(200).optional(),
    channels: z.array(RectSchema).max(200).optional(),
  })
  .superRefine((p, ctx) => {
    const total = p.families.reduce((n, f) => n + f.count.x * f.count.y, 0);
    if (total > MAX_POSITIONS) {
      ctx.addIssue({ code: 'custom', path: ['families'], message: `the pattern has ${total} positions; at most ${MAX_POSITIONS} are supported` });
    }
    const ids = new Set<string>();
    p.families.forEach((f, i) => {
      if (ids.has(f.id)) ctx.addIssue({ code: 'custom', path: ['families', i, 'id'], message: `duplicate family id "${f.id}"` });
      ids.add(f.id);
    });
    const panelIds = new Set<string>();
    (p.panels ?? []).forEach((q, i) => {
      if (panelIds.has(q.id)) ctx.addIssue({ code: 'custom', path: ['panels', i, 'id'], message: `duplicate panel id "${q.id}"` });
      panelIds.add(q.id);
    });
  });
export type Pattern = z.infer<typeof PatternSchema>;

const PointPx = z.tuple([finite, finite]);

export const PointsSchema = z.object({
  image: z.object({ width: z.number().int().positive(), height: z.number().int().positive(), focalPx: positive.optional() }),
  reference: z.object({
    sizeMm: positive.max(2000),
    /** The reference square's four corners in image px, in order around the square. */
    corners: z.tuple([PointPx, PointPx, PointPx, PointPx]),
    /** 1σ of each corner coordinate, px, as the detector knows it (from its fitted edges' residuals). */
    cornerSigmaPx: positive.max(10).optional(),
    /**
     * 1σ of the square's true side, mm, when known (the rule's reading of the print, or what remains of an edge-bias
     * correction): a scale error common to X and Y.
     */
    sizeSigmaMm: positive.max(100).optional(),
    /**
     * Covariance of the corners' coordinates (x0, y0, x1, y1, …, in the order given), px², row-major 8 × 8, for a
     * detector whose corners share fitted sides and so err together; overrides `cornerSigmaPx`.
     */
    cornerCovPx2: z.array(finite).length(64).optional(),
  }),
  holes: z
    .array(
      z.object({
        x: finite,
        y: finite,
        diameterPx: positive,
        /** Detector's confidence in [0, 1]; 1 when absent. */
        confidence: z.number().min(0).max(1).optional(),
      }),
    )
    .max(100_000),
});
export type Points = z.infer<typeof PointsSchema>;

/**
 * Distances measured between two positions (a steel tape between hole centres, or the machine's coordinates with the
 * spindle jogged over both), given with a check: labels as the report writes them (`insert A1`), length and 1σ in mm.
 */
export const MeasuredDistanceSchema = z.object({
  from: z.string().trim().min(1).max(60),
  to: z.string().trim().min(1).max(60),
  mm: positive.max(100_000),
  sigmaMm: positive.max(1_000),
}).strict();
export type MeasuredDistance = z.infer<typeof MeasuredDistanceSchema>;
export const MeasuredDistancesSchema = z.array(MeasuredDistanceSchema).max(50);

/** A given distance in the report: what was given, what the photo made of it, and its residual after the fit (mm). */
export const ReportDistanceSchema = MeasuredDistanceSchema.extend({
  /** Whether it entered the fit; when not, `note` says why (a position not seen, say). */
  used: z.boolean(),
  /** The length from the photo with the reference square alone, and after combining every distance with it. */
  squareMm: finite.nullable(),
  fittedMm: finite.nullable(),
  /** Given − fitted, mm, and that over its own 1σ (given and photo together). */
  residualMm: finite.nullable(),
  residualSigmas: finite.nullable(),
  note: z.string().optional(),
});
export type ReportDistance = z.infer<typeof ReportDistanceSchema>;

export const VERDICTS = ['in', 'marginal', 'out', 'missing'] as const;
export type Verdict = (typeof VERDICTS)[number];

/** A verdict on a measured quantity (no `missing`). */
const MeasuredVerdict = z.enum(['in', 'marginal', 'out']);

/**
 * Hole-to-hole (form) deviation of a measured position, bed frame mm: its deviation once the lattice's own shape is
 * taken out (after the best robust 2-D affine of all matched positions onto nominal, panels' misplacement kept), with
 * its 1σ (centre noise and the affine fit; the reference square does not enter) and its verdict. Absent in reports
 * made before it existed.
 */
export const ReportFormSchema = z.object({ dx: finite, dy: finite, r: finite, uncertaintyMm: finite, verdict: MeasuredVerdict });
export type ReportForm = z.infer<typeof ReportFormSchema>;

/**
 * Overall size and squareness: the largest displacement (mm) that the measured scale X, scale Y and squareness make
 * at any nominal position after the best rigid placement, its 1σ, and its verdict against the tightest tolerance
 * (mm). `worstMm` and `uncertaintyMm` are null (verdict `marginal`) when the reference could not observe the shape.
 */
export const ReportShapeCheckSchema = z.object({ verdict: MeasuredVerdict, worstMm: finite.nullable(), uncertaintyMm: finite.nullable(), toleranceMm: finite });
export type ReportShapeCheck = z.infer<typeof ReportShapeCheckSchema>;

export const ReportPositionSchema = z.object({
  family: z.string(),
  col: z.number().int(),
  row: z.number().int(),
  label: z.string(),
  panel: z.string().nullable(),
  nominal: Vec2Schema,
  measured: Vec2Schema.nullable(),
  deviation: z.object({ dx: finite, dy: finite, r: finite }).nullable(),
  uncertaintyMm: finite.nullable(),
  toleranceMm: finite,
  verdict: z.enum(VERDICTS),
  /** True when a missing position lies under the reference sheet (expected to be unseen). */
  hidden: z.boolean().optional(),
  /** True when a missing position falls outside the photo. */
  outOfView: z.boolean().optional(),
  /** Hole-to-hole deviation; `deviation`, `uncertaintyMm` and `verdict` above are the rigid ones (whole bed). */
  form: ReportFormSchema.optional(),
});
export type ReportPosition = z.infer<typeof ReportPositionSchema>;

export const ReportPanelSchema = z.object({
  id: z.string(),
  dx: finite,
  dy: finite,
  rotationDeg: finite,
  positions: z.number().int(),
  uncertaintyMm: finite,
  /** 1σ of rotationDeg, degrees. */
  rotationUncertaintyDeg: finite.optional(),
  /** The move that puts the panel back (the negative of its offset), in words, mm and inches. */
  correction: z.string(),
});
export type ReportPanel = z.infer<typeof ReportPanelSchema>;

const Uncertain = finite.nullable();

export const ReportSchema = z.object({
  version: z.literal(1),
  units: z.literal('mm'),
  pattern: z.object({ name: z.string() }).passthrough(),
  positions: z.array(ReportPositionSchema),
  /** Detections that match no nominal position, in image px (origin top-left, +y down). */
  unmatched: z.array(z.object({ x: finite, y: finite })),
  panels: z.array(ReportPanelSchema),
  /** Steps between neighbouring panels: relative offset at their shared seam, mm. */
  seams: z.array(z.object({ a: z.string(), b: z.string(), dx: finite, dy: finite, r: finite, uncertaintyMm: finite })).default([]),
  lattice: z.object({
    rotationDeg: finite,
    scaleX: Uncertain,
    scaleY: Uncertain,
    squarenessDeg: Uncertain,
    observed: z.boolean(),
    reason: z.string().optional(),
    uncertainty: z.object({ rotationDeg: Uncertain, scaleX: Uncertain, scaleY: Uncertain, squarenessDeg: Uncertain }),
    /** Overall size and squareness against the tightest tolerance; absent in older reports. */
    shapeCheck: ReportShapeCheckSchema.optional(),
  }),
  camera: z.object({ focalPx: finite, k1: finite, k2: finite }),
  summary: z.object({
    matched: z.number().int(),
    missing: z.number().int(),
    rmsMm: finite,
    maxMm: finite,
    out: z.number().int(),
    marginal: z.number().int(),
    /** Whole-bed verdict: every position in; some marginal or a panel to reseat; positions out. */
    verdict: z.enum(['pass', 'marginal', 'fail']),
    /** The verdict and its reasons in one sentence a machinist understands. */
    sentence: z.string(),
    /** Positions out and too close to call hole to hole (form); absent in older reports. */
    formOut: z.number().int().optional(),
    formMarginal: z.number().int().optional(),
    /** Overall size and squareness in one sentence, with what would settle it when the reference cannot; absent in older reports. */
    shapeSentence: z.string().optional(),
  }),
  /** Things the reader should know that are not figures (ambiguous placement, unobserved terms…). */
  warnings: z.array(z.string()).optional(),
  /** Measured distances given with the check (absent when none were). */
  distances: z.array(ReportDistanceSchema).optional(),
}).passthrough();
export type Report = z.infer<typeof ReportSchema>;
