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
/** The most positions along one axis of one family. */
export const MAX_COUNT_PER_AXIS = 2000;
/** The most panels (strips, boards) and T-track channels a pattern may describe. */
export const MAX_PANELS = 200;

/**
 * Physical bounds of a bed pattern, mm (a pattern in inches is held to the same lengths, converted). A bound
 * exists so that a typing slip (1e308, 0.001) is refused at once with the range, instead of reaching the
 * analysis; the ranges are wide enough for every bed we know of (common practice):
 * - bed side 10 mm – 10 m: hobby routers start near 300 mm, the largest gantry tables are 6–8 m long;
 * - hole diameter 1 – 100 mm: locating pins 3–6 mm, threaded inserts M4–M12 and 1/4-20–1/2-13, dog holes
 *   19–20 mm, 3/4 in and 1 in bench-dog holes, vacuum ports up to about 50 mm;
 * - pitch 5 – 2000 mm: 32 mm system holes, 1 in to 8 in or 50–200 mm insert and dog lattices, up to a few
 *   fixings per full 2440 mm sheet.
 */
export const BED_SIDE_MM = { min: 10, max: 10_000 } as const;
export const HOLE_DIAMETER_MM = { min: 1, max: 100 } as const;
export const PITCH_MM = { min: 5, max: 2000 } as const;
/** A radial tolerance a clamp or dog can need, mm: 1 µm (below any photo's resolution) to 50 mm. */
export const TOLERANCE_MM = { min: 0.001, max: 50 } as const;

/** Photo side, px: at most 65 535, the largest a JPEG can declare (ITU-T T.81, 16-bit line and sample counts). */
export const MAX_IMAGE_SIDE_PX = 65_535;
/** Side of the reference square in the points contract, mm: 1 mm to 2 m (the upload form asks for 20–2000 mm). */
export const REFERENCE_SIZE_MM = { min: 1, max: 2000 } as const;
/** The most detections one photo may carry (five per nominal position at most). */
export const MAX_DETECTIONS = 100_000;

/** A finite number (zod 4 refuses NaN and ±Infinity in z.number()) with a message that names the field. */
const num = (field: string) => z.number({ error: (i) => (i.input === undefined ? `${field} is required` : `${field} must be a finite number`) });
/** A finite number in [min, max] of `unit`, refused with "<field> must be between min and max unit". */
export const numberIn = (field: string, min: number, max: number, unit: string) => {
  const msg = `${field} must be between ${min} and ${max} ${unit}`.trimEnd();
  return num(field).min(min, msg).max(max, msg);
};

const finite = z.number().finite();
const positive = finite.positive();
export const Vec2Schema = z.object({ x: finite, y: finite });
export const HOLE_KINDS = ['threaded-insert', 'dog-hole', 'pin-hole', 'other'] as const;
export type HoleKind = (typeof HOLE_KINDS)[number];

export const CLEARANCE_CLASSES = ['fine', 'medium', 'coarse', 'close', 'normal', 'loose'] as const;
export type ClearanceClass = (typeof CLEARANCE_CLASSES)[number];

/** What fits in a family's holes, and so how far a hole may stray: one of three forms. */
export const FitSpecSchema = z.union([
  z.object({ toleranceMm: numberIn('toleranceMm', TOLERANCE_MM.min, TOLERANCE_MM.max, 'mm') }).strict(),
  z.object({ fastener: z.string().min(1).max(20), clearance: z.enum(CLEARANCE_CLASSES) }).strict(),
  z.object({ pinDiameter: num('pinDiameter').positive('pinDiameter must be more than 0') }).strict(),
]);
export type FitSpec = z.infer<typeof FitSpecSchema>;

const countIn = (field: string) => num(field).int(`${field} must be a whole number`).min(1, `${field} must be between 1 and ${MAX_COUNT_PER_AXIS}`).max(MAX_COUNT_PER_AXIS, `${field} must be between 1 and ${MAX_COUNT_PER_AXIS}`);

export const FamilySchema = z.object({
  id: z.string().min(1).max(40).regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, - and _ only'),
  kind: z.enum(HOLE_KINDS),
  /** Human name for labels, e.g. "insert" or "dog"; defaults from kind. */
  label: z.string().min(1).max(30).optional(),
  /** Hole diameter in the pattern's units; HOLE_DIAMETER_MM bounds it (checked with the units, in PatternSchema). */
  holeDiameter: num('holeDiameter').positive('holeDiameter must be more than 0'),
  /** Centre of the family's position (col 0, row 0), in the bed frame; within one bed side of the bed. */
  origin: z.object({ x: num('origin.x'), y: num('origin.y') }),
  pitch: z.object({ x: num('pitch.x').positive('pitch.x must be more than 0'), y: num('pitch.y').positive('pitch.y must be more than 0') }),
  count: z.object({ x: countIn('count.x'), y: countIn('count.y') }),
  fit: FitSpecSchema,
});
export type Family = z.infer<typeof FamilySchema>;

export const RectSchema = z.object({ x: num('x'), y: num('y'), width: num('width').positive('width must be more than 0'), height: num('height').positive('height must be more than 0') });
export type Rect = z.infer<typeof RectSchema>;

export const PanelSchema = RectSchema.extend({
  id: z.string().min(1).max(40).regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, - and _ only'),
});
export type Panel = z.infer<typeof PanelSchema>;

/** Shortest decimal of a bound in the pattern's units (4 significant digits for inches). */
const fmt = (v: number) => String(Number(v.toPrecision(4)));

export const PatternSchema = z
  .object({
    version: z.literal(1),
    name: z.string().min(1).max(120),
    units: z.enum(['mm', 'in']),
    /** Bed size in the pattern's units; BED_SIDE_MM bounds each side. */
    bed: z.object({ width: num('bed.width').positive('bed.width must be more than 0'), height: num('bed.height').positive('bed.height must be more than 0') }),
    families: z.array(FamilySchema).min(1).max(8),
    panels: z.array(PanelSchema).max(MAX_PANELS).optional(),
    channels: z.array(RectSchema).max(MAX_PANELS).optional(),
  })
  .superRefine((p, ctx) => {
    // Physical bounds in the pattern's own units: k converts mm to them.
    const u = p.units, k = u === 'in' ? 1 / MM_PER_IN : 1;
    const within = (path: (string | number)[], field: string, v: number, lo: number, hi: number) => {
      if (!(v >= lo && v <= hi)) ctx.addIssue({ code: 'custom', path, message: `${field} must be between ${fmt(lo)} and ${fmt(hi)} ${u} (got ${v})` });
      return v >= lo && v <= hi;
    };
    const W = p.bed.width, H = p.bed.height;
    const bedOk = [within(['bed', 'width'], 'bed.width', W, BED_SIDE_MM.min * k, BED_SIDE_MM.max * k), within(['bed', 'height'], 'bed.height', H, BED_SIDE_MM.min * k, BED_SIDE_MM.max * k)].every(Boolean);
    const total = p.families.reduce((n, f) => n + f.count.x * f.count.y, 0);
    if (total > MAX_POSITIONS) {
      ctx.addIssue({ code: 'custom', path: ['families'], message: `the pattern has ${total} positions; at most ${MAX_POSITIONS} are supported` });
    }
    // Coordinates stay near the bed: a position, panel or channel may lie off it (a mistake the pattern lint,
    // lib/patterns/lint.ts, shows on the drawing), but not farther off than one bed side, so that the analysis's
    // work and numbers stay bounded. Overlapping holes and fits that cannot hold are the lint's too.
    const near = (v: number, side: number) => v >= -side && v <= 2 * side;
    const ids = new Set<string>();
    p.families.forEach((f, i) => {
      if (ids.has(f.id)) ctx.addIssue({ code: 'custom', path: ['families', i, 'id'], message: `duplicate family id "${f.id}"` });
      ids.add(f.id);
      const at = (...rest: string[]) => ['families', i, ...rest];
      within(at('holeDiameter'), 'holeDiameter', f.holeDiameter, HOLE_DIAMETER_MM.min * k, HOLE_DIAMETER_MM.max * k);
      for (const axis of ['x', 'y'] as const) {
        const side = axis === 'x' ? W : H;
        const pitchOk = within(at('pitch', axis), `pitch.${axis}`, f.pitch[axis], PITCH_MM.min * k, PITCH_MM.max * k);
        if (!bedOk || !pitchOk) continue;
        const o = f.origin[axis], last = o + (f.count[axis] - 1) * f.pitch[axis];
        if (!near(o, side)) {
          ctx.addIssue({ code: 'custom', path: at('origin', axis), message: `origin.${axis} must lie on the bed (0 to ${fmt(side)} ${u}), or at most one bed side off it (${fmt(-side)} to ${fmt(2 * side)} ${u}); got ${o}` });
        } else if (!near(last, side)) {
          ctx.addIssue({ code: 'custom', path: at('count', axis), message: `count.${axis} (${f.count[axis]}) at pitch.${axis} ${f.pitch[axis]} ${u} puts the last position at ${fmt(last)} ${u}, more than one bed side (${fmt(side)} ${u}) off the bed` });
        }
      }
    });
    const rects = (list: Rect[] | undefined, key: 'panels' | 'channels') => {
      if (!bedOk) return;
      (list ?? []).forEach((q, i) => {
        if (!(near(q.x, W) && near(q.y, H) && near(q.x + q.width, W) && near(q.y + q.height, H))) {
          ctx.addIssue({ code: 'custom', path: [key, i], message: `${key === 'panels' ? 'panel' : 'channel'} ${i + 1} (x ${q.x}, y ${q.y}, ${q.width} × ${q.height} ${u}) lies more than one bed side off the ${fmt(W)} × ${fmt(H)} ${u} bed` });
        }
      });
    };
    rects(p.panels, 'panels');
    rects(p.channels, 'channels');
    const panelIds = new Set<string>();
    (p.panels ?? []).forEach((q, i) => {
      if (panelIds.has(q.id)) ctx.addIssue({ code: 'custom', path: ['panels', i, 'id'], message: `duplicate panel id "${q.id}"` });
      panelIds.add(q.id);
    });
  });
export type Pattern = z.infer<typeof PatternSchema>;

const PointPx = z.tuple([num('x'), num('y')]);

/**
 * Why a position was not measured although it may be in the photo: its rim, with a blur margin, meets the reference
 * sheet ('sheet'), the photo's border ('border') or something lying over it ('occluded', e.g. a clamp). Such a hole
 * is reported not seen, never in or out.
 */
export const HIDDEN_REASONS = ['sheet', 'border', 'occluded'] as const;
export type HiddenReason = (typeof HIDDEN_REASONS)[number];

/**
 * Blur margin around a hole's rim, image px: a rim closer than this to the sheet or the photo's border is seen only in
 * part (the edge spread of a photo blurred by up to σ 1.5 px reaches about 2σ, plus a pixel for the outline's error).
 */
export const RIM_MARGIN_PX = 4;
const side = (field: string) => num(field).int(`${field} must be a whole number of px`).min(1, `${field} must be between 1 and ${MAX_IMAGE_SIDE_PX} px`).max(MAX_IMAGE_SIDE_PX, `${field} must be between 1 and ${MAX_IMAGE_SIDE_PX} px`);

export const PointsSchema = z.object({
  image: z.object({ width: side('image.width'), height: side('image.height'), focalPx: numberIn('focalPx', 1, 100 * MAX_IMAGE_SIDE_PX, 'px').optional() }),
  reference: z.object({
    sizeMm: numberIn('sizeMm', REFERENCE_SIZE_MM.min, REFERENCE_SIZE_MM.max, 'mm'),
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
        x: num('x'),
        y: num('y'),
        diameterPx: num('diameterPx').positive('diameterPx must be more than 0'),
        /** Detector's confidence in [0, 1]; 1 when absent. */
        confidence: numberIn('confidence', 0, 1, '').optional(),
      }),
    )
    .max(MAX_DETECTIONS, `at most ${MAX_DETECTIONS} holes`),
  /**
   * The reference sheet's outline (the paper around the printed square), image px, four corners in order around it;
   * may reach past the photo. A hole whose rim, with a blur margin, meets it is not measured (reported hidden by the
   * sheet). Absent: only the printed square is known to hide holes.
   */
  sheet: z.tuple([PointPx, PointPx, PointPx, PointPx]).optional(),
  /**
   * Holes the detector saw only in part (their rim meets the sheet, the photo's border or something lying over it):
   * not measured; the position they belong to is reported not seen, with the reason. Image px.
   */
  hidden: z
    .array(z.object({ x: num('x'), y: num('y'), diameterPx: num('diameterPx').positive('diameterPx must be more than 0'), by: z.enum(HIDDEN_REASONS) }))
    .max(MAX_DETECTIONS, `at most ${MAX_DETECTIONS} hidden holes`)
    .optional(),
}).superRefine((d, ctx) => {
  // every point lies on the photo (image px, origin top-left); a hole is smaller than the photo
  const { width: w, height: h } = d.image;
  const on = (x: number, y: number) => x >= 0 && y >= 0 && x <= w && y <= h;
  d.reference.corners.forEach(([x, y], i) => {
    if (!on(x, y)) ctx.addIssue({ code: 'custom', path: ['reference', 'corners', i], message: `corner ${i + 1} (${x}, ${y}) px must lie on the ${w} × ${h} px photo` });
  });
  const i = d.holes.findIndex((q) => !on(q.x, q.y));
  if (i >= 0) ctx.addIssue({ code: 'custom', path: ['holes', i], message: `hole ${i + 1} at (${d.holes[i]!.x}, ${d.holes[i]!.y}) px must lie on the ${w} × ${h} px photo` });
  const j = d.holes.findIndex((q) => q.diameterPx > Math.max(w, h));
  if (j >= 0) ctx.addIssue({ code: 'custom', path: ['holes', j, 'diameterPx'], message: `diameterPx must be between 0 and ${Math.max(w, h)} px (the photo's longer side)` });
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
  /** True when a missing position lies under the reference sheet or is seen only in part (expected to be unseen). */
  hidden: z.boolean().optional(),
  /** Why a hidden position was not measured (HIDDEN_REASONS); absent in reports made before it existed. */
  hiddenBy: z.enum(HIDDEN_REASONS).optional(),
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

/** Codes of the photo-quality stage (lib/vision/quality.ts): what in the photo limits or prevents the measurement. */
export const PHOTO_ISSUE_CODES = ['blurred', 'motion-blur', 'overexposed', 'underexposed', 'target-small', 'holes-small', 'tilted', 'target-cut', 'bed-cut'] as const;
export type PhotoIssueCode = (typeof PHOTO_ISSUE_CODES)[number];

/**
 * The photo-quality verdict: each issue with what was measured and what to do, and the accuracy the photo can
 * reach (1σ): `positionMm` the RMS distance of a measured position from the truth with the global scale set
 * apart (hole to hole), `scalePpm` the scale along each axis (the report's scale X or Y, from the square); null
 * when the photo cannot be measured at all.
 */
export const PhotoQualitySchema = z.object({
  issues: z.array(z.object({ code: z.enum(PHOTO_ISSUE_CODES), message: z.string(), advice: z.string() })),
  predicted: z.object({ positionMm: finite, scalePpm: finite }).nullable(),
  /** What was measured, image px unless named otherwise (absent when the target was not found). */
  measured: z.object({
    widthPx: z.number().int(),
    heightPx: z.number().int(),
    edgeSpreadPx: finite.nullable(),
    defocusSigmaPx: finite.nullable(),
    motion: z.object({ lengthPx: finite, directionDeg: finite }).nullable(),
    targetSidePx: finite.nullable(),
    holeDiameterPx: finite.nullable(),
    tiltDeg: finite.nullable(),
    /** Shares (0–1) of clipped samples: the target's white paper, its white right at the edge, its black, the bed around the holes. */
    clipped: z.object({ targetWhite: finite, targetEdge: finite, targetBlack: finite, holesSurround: finite }).nullable(),
    /** Level of the target's white paper, 0–255 as encoded. */
    whiteLevel: finite.nullable(),
    /** The target's white over its black in linear light (a print gives 16–30; less with the white clipped: over-exposed); absent in older verdicts. */
    targetContrast: finite.nullable().optional(),
    holesSampled: z.number().int(),
  }),
  timeMs: finite,
});
export type PhotoQuality = z.infer<typeof PhotoQualitySchema>;

const Uncertain = finite.nullable();

export const ReportSchema = z.object({
  version: z.literal(1),
  units: z.literal('mm'),
  /** The pattern's name; a report may also carry the bed's outline and panels (pattern units) for its maps. */
  pattern: z.object({
    name: z.string(),
    units: z.enum(['mm', 'in']).optional(),
    bed: z.object({ width: finite, height: finite }).optional(),
    panels: z.array(z.object({ id: z.string(), x: finite, y: finite, width: finite, height: finite })).optional(),
  }),
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
  /**
   * The camera as the fit sees it: focal length (px), Brown–Conrady k1, k2 on focal-normalised coordinates about the
   * principal point (image px), their 1σ, the focal length's source and the view's tilt from straight down
   * (degrees). A shared report carries only neutral focalPx, k1, k2.
   */
  camera: z.object({
    focalPx: finite,
    k1: finite,
    k2: finite,
    uncertainty: z.object({ k1: Uncertain, k2: Uncertain }).optional(),
    focalSource: z.enum(['exif', 'assumed', 'estimated']).optional(),
    tiltDeg: finite.optional(),
    principalPoint: Vec2Schema.optional(),
  }),
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
  /** Figures of the fit for whoever checks the method (not shown to a machinist, never shared). */
  diagnostics: z.object({
    /** The scale's 1σ from the square's corners and from the fit, ratios. */
    scaleSigmaParts: z.object({ corners: finite, fit: finite }).optional(),
    /** Detected / nominal hole diameter. */
    diameterRatio: finite,
    /** Robust 1σ of the fit's image residuals, px per axis. */
    residualSigmaPx: finite,
    /** 1σ of a hole centre used for the positions' uncertainty, px. */
    centreSigmaPx: finite,
    /** Matched holes in the fit. */
    inFit: z.number().int(),
    /** The reference square's side in the photo, px; its corners' 1σ used and its affine fit's RMS, px. */
    squareSidePx: finite,
    cornerSigmaPx: finite,
    squareResidualPx: finite,
    /** Positions under the reference sheet. */
    hidden: z.number().int(),
    /**
     * Each hole family's common offset in the fit against the family with the most matches (mm, lattice frame), when
     * more than one family shares a panel: a family set off, or one whose holes look shifted (a lit wall).
     */
    familyOffsetsMm: z.array(z.object({ family: z.string(), dx: finite, dy: finite, /** Per-axis 1σ it leaves in each of the family's positions, mm. */ sigmaMm: finite })).optional(),
  }).optional(),
  /** The photo's quality as the first stage measured it (photo analyses only). */
  photo: z.object({ quality: PhotoQualitySchema }).optional(),
});
export type Report = z.infer<typeof ReportSchema>;
