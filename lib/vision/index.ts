/**
 * Photo → hole centres: the worker's eyes. `detectFromImage` reads the uploaded bytes, finds the reference square
 * (or takes the user's corners) and every hole, and returns them in the measurement core's Points format
 * (image px, origin top-left, +y down). `analyzeImage` adds the fit and returns the Report.
 */
import type { AnalyzeOptions } from '@/lib/geometry';
import { RIM_MARGIN_PX, type HiddenReason, type Pattern, type PhotoQuality, type Points, type Report } from '@/lib/geometry/contract';
import { VisionInputError } from './errors';
import { homographyFrom4, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { cutTargetMark } from './cut-target';
import { findHoles, type CentreMethod, type FamilySize, type HoleDetection, type PartialHole } from './holes';
import { findSheet, signedDistanceToOutline, type SheetOutline } from './sheet';
import { DEFAULT_MAX_PIXELS, loadPhoto, medianLevel, reduce, type LoadedPhoto } from './load';
import { measureQuality } from './quality';
import { findSquare, type Corners, type SquareFound } from './square';
import { targetCornersMm } from './target';

export { VisionInputError, type VisionErrorCode } from './errors';
export { DEFAULT_MAX_PIXELS } from './load';

/** Stages reported through `onStage`, in order. */
export type VisionStage = 'reading photo' | 'finding square' | 'finding holes' | 'fitting';

/** A rim cut over at least this arc (degrees) by something lying over the hole is not measured. */
export const OCCLUDED_GAP_DEG = 30;

/** A hole seen only in part: image px, and why. */
export interface HiddenHole {
  x: number;
  y: number;
  diameterPx: number;
  by: HiddenReason;
  family?: string;
}

/** Fewest holes the fit can work with. */
export const MIN_HOLES = 4;

export interface DetectOptions {
  /** Outer size of the reference square, mm. */
  referenceMm: number;
  /** The square's four corners in image px (in order around it), overriding the search. */
  corners?: [[number, number], [number, number], [number, number], [number, number]];
  /** Decompression-bomb limit, px (default 50 MP). */
  maxPixels?: number;
  onStage?: (stage: VisionStage) => void;
  /** Centre refinement (default 'centroid', the better one measured by the bench). */
  method?: CentreMethod;
  /**
   * Called with the photo-quality verdict as soon as it is known (after the decode and the square, before the
   * holes), also when no square is found; awaited, so a caller can store it before the rest runs.
   */
  onQuality?: (quality: PhotoQuality) => void | Promise<void>;
}

export interface DetectMeta {
  width: number;
  height: number;
  /** EXIF orientation of the file (1–8), applied before detection. */
  orientation: number;
  focalPx?: number;
  bitDepth: 8 | 16;
  format: string;
  /** How the square was obtained and, for Gridproof's target, whether its orientation mark was seen. */
  square: {
    source: 'detected' | 'given';
    kind?: 'target' | 'square';
    markFound?: boolean;
    edgeRmsPx?: number;
    /** Corners from the frame stroke's centreline (camera-independent) or from outer edges only. */
    reference?: 'centreline' | 'outer-edge';
    /** Edge bias measured on the frame stroke, px (positive: black reads wider than printed), and its spread. */
    edgeBiasPx?: number;
    edgeBiasSdPx?: number;
    /** 1σ of the edge bias used, px: measured on the stroke, or assumed for outer edges only (edgefit.ts). */
    edgeBiasSigmaPx?: number;
    /** 1σ of each corner per image axis, px (RMS of the eight), from the fitted edges' residuals; in the points too. */
    cornerSigmaPx?: number;
  };
  /** Factor of the reduced image for the candidate passes. */
  reduction: number;
  /** Grey channel mix (R, G, B weights). */
  mix: [number, number, number];
  detections: (HoleDetection & { family: string })[];
  /** Holes seen only in part, not measured, with the reason (also in the points). */
  hidden: HiddenHole[];
  /** The reference sheet's outline, image px, and how each side was found (sheet.ts); absent for corners given by hand. */
  sheet?: { cornersPx: [number, number][]; sides: SheetOutline['sides'] };
  /** The photo-quality stage's verdict (lib/vision/quality.ts). */
  quality: PhotoQuality;
  timingsMs: Record<string, number>;
}

function familySizes(pattern: Pattern): FamilySize[] {
  const k = pattern.units === 'in' ? 25.4 : 1;
  return pattern.families.map((f) => ({ id: f.id, diameterMm: f.holeDiameter * k }));
}

/** Wall-clock time per stage, ms to 0.1 ms: `lap(k)` records the time since the previous lap under k. */
function stageClock(): { lap: (stage: string) => void; timings: Record<string, number> } {
  const timings: Record<string, number> = {};
  let t0 = performance.now();
  return {
    timings,
    lap: (k) => {
      const n = performance.now();
      timings[k] = Math.round((n - t0) * 10) / 10;
      t0 = n;
    },
  };
}

/** The photo and its reduced copy (8 bit, `factor` full-image px a reduced px) the candidate passes run on. */
interface PhotoPlanes {
  photo: LoadedPhoto;
  small: ReturnType<typeof reduce>;
  factor: number;
}

/** The square's corners (image px), how they were found and their precision (px, px²; none for corners given by hand). */
interface SquareSource {
  corners: Corners;
  square: DetectMeta['square'];
  precision: Pick<Points['reference'], 'cornerSigmaPx' | 'cornerCovPx2'>;
  /** Null for a square found in the photo, which was already told from a cut target's mark; absent for given corners. */
  cutMark?: null;
}

/** What the square search found, for the meta (px, to 0.001 px). */
function detectedSquareMeta(sq: SquareFound): DetectMeta['square'] {
  const r3 = (x: number) => Math.round(x * 1000) / 1000;
  return {
    source: 'detected', kind: sq.kind, markFound: sq.markFound, edgeRmsPx: r3(sq.edgeRmsPx), reference: sq.reference, cornerSigmaPx: r3(sq.cornerSigmaPx),
    ...(sq.edgeBiasPx !== undefined ? { edgeBiasPx: r3(sq.edgeBiasPx), edgeBiasSdPx: r3(sq.edgeBiasSdPx ?? 0) } : {}),
    ...(sq.edgeBiasSigmaPx !== undefined ? { edgeBiasSigmaPx: r3(sq.edgeBiasSigmaPx) } : {}),
  };
}

/**
 * The square: the user's corners, or found in the photo (square.ts). When none is found, or what is found is the
 * orientation mark of a target cut by the border (cut-target.ts), the photo's quality is still measured and
 * reported, then `no-square` is thrown (with the target-cut advice for a cut target).
 */
async function locateSquare({ photo, small, factor }: PhotoPlanes, pattern: Pattern, opts: DetectOptions): Promise<SquareSource> {
  if (opts.corners) return { corners: opts.corners, square: { source: 'given' }, precision: {} };
  const { grey, width: w, height: h } = photo;
  const sq = await findSquare(grey, w, h, small, factor);
  // the orientation mark of a target cut by the border is found whole as a small filled square: not the reference
  const cutMark = sq ? cutTargetMark(grey, w, h, sq.corners) : null;
  if (!sq || cutMark) {
    const quality = await measureQuality({ grey, width: w, height: h, small, factor, corners: sq ? sq.corners : null, referenceMm: opts.referenceMm, pattern, cutMark, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) });
    await opts.onQuality?.(quality);
    const cut = cutMark ? quality.issues.find((i) => i.code === 'target-cut') : undefined;
    throw new VisionInputError('no-square', cut ? `No whole reference square was found. ${cut.message} ${cut.advice}` : 'No reference square was found in the photo. Make sure the whole printed square is in view, flat and not glared.');
  }
  return {
    corners: sq.corners,
    cutMark: null,
    square: detectedSquareMeta(sq),
    precision: { cornerSigmaPx: Math.max(1e-4, sq.cornerSigmaPx), ...(sq.cornerCovPx2 ? { cornerCovPx2: sq.cornerCovPx2 } : {}) },
  };
}

/** The homography target frame (mm, side `sizeMm`) → image px through the corners; `no-square` when they are no quadrilateral. */
function targetToImage(sizeMm: number, corners: Corners): Mat3 {
  try {
    return homographyFrom4(targetCornersMm(sizeMm), corners);
  } catch {
    throw new VisionInputError('no-square', 'The four corners given do not form a quadrilateral. Mark them in order around the square.');
  }
}

/**
 * Every hole of the pattern's families (holes.ts) and the candidates seen in part. The candidate pass runs on the
 * reduced image only while the smallest hole keeps 4.5 px across there; a bed with small holes for the photo's scale
 * (M6 on a full sheet) is searched at a finer reduction, down to the full image. Around a detected square only the
 * printed square (and 2 % of its size, mm) is kept out of the search: the sheet itself hides what lies under it.
 */
async function searchHoles({ photo, small, factor }: PhotoPlanes, H: Mat3, sizeMm: number, pattern: Pattern, method: CentreMethod, detected: boolean): Promise<{ found: DetectMeta['detections']; partial: PartialHole[] }> {
  const { grey, width: w, height: h } = photo;
  const S = sizeMm;
  const m = 0.02 * S;
  const exclude: [number, number][] = [[-m, -m], [S + m, -m], [S + m, S + m], [-m, S + m]];
  const partial: PartialHole[] = [];
  const families = familySizes(pattern);
  const holePx = Math.min(...families.map((f) => f.diameterMm)) * homographyScale(H, S / 2, S / 2);
  const holeFactor = Math.max(1, Math.min(factor, Math.floor(holePx / 4.5)));
  const holeSmall = holeFactor === factor ? small : reduce(grey, w, h, holeFactor);
  const found = await findHoles(grey, w, h, holeSmall, holeFactor, H, families, { method, onPartial: (p) => partial.push(p), ...(detected ? { exclude } : {}) });
  return { found, partial };
}

/**
 * Why a hole at (x, y) px of `diameterPx`, at `planeMm` in the target frame, is seen only in part, or null: its rim
 * with a blur margin of RIM_MARGIN_PX meets the photo's border or the sheet's outline (target frame, mm), or is cut
 * over OCCLUDED_GAP_DEG or more (`gapDeg`) by something lying over it.
 */
function hiddenReason(x: number, y: number, diameterPx: number, planeMm: [number, number], gapDeg: number, w: number, h: number, H: Mat3, sheet: SheetOutline | null): HiddenReason | null {
  const reachPx = diameterPx / 2 + RIM_MARGIN_PX;
  if (x < reachPx || y < reachPx || x > w - reachPx || y > h - reachPx) return 'border';
  const mmPerPx = 1 / homographyScale(H, planeMm[0], planeMm[1]);
  if (sheet && signedDistanceToOutline(sheet.cornersMm, planeMm[0], planeMm[1]) < reachPx * mmPerPx) return 'sheet';
  return gapDeg >= OCCLUDED_GAP_DEG ? 'occluded' : null;
}

/**
 * Holes seen whole (measured) apart from holes seen in part (not measured). A candidate refused for a broken rim
 * is one seen in part (by the sheet or the border when they are that near, else by something on it), unless it
 * lies off the photo or on a hole already listed.
 */
function separateHidden(found: DetectMeta['detections'], partial: readonly PartialHole[], w: number, h: number, H: Mat3, sheet: SheetOutline | null): { dets: DetectMeta['detections']; hidden: HiddenHole[] } {
  const dets: DetectMeta['detections'] = [];
  const hidden: HiddenHole[] = [];
  for (const d of found) {
    const by = hiddenReason(d.x, d.y, d.diameterPx, d.planeMm, d.rimGapDeg, w, h, H, sheet);
    if (by) hidden.push({ x: d.x, y: d.y, diameterPx: d.diameterPx, by, family: d.family });
    else dets.push(d);
  }
  for (const p of partial) {
    if (p.x < 0 || p.y < 0 || p.x > w || p.y > h) continue;
    if (hidden.some((q) => Math.hypot(q.x - p.x, q.y - p.y) < q.diameterPx / 2) || dets.some((q) => Math.hypot(q.x - p.x, q.y - p.y) < q.diameterPx / 2)) continue;
    hidden.push({ x: p.x, y: p.y, diameterPx: p.diameterPx, by: hiddenReason(p.x, p.y, p.diameterPx, p.planeMm, 360, w, h, H, sheet)! });
  }
  return { dets, hidden };
}

/** The measurement core's input (image px): the square with its precision, the holes seen whole, the sheet and the holes seen in part. */
function toPoints(photo: LoadedPhoto, sizeMm: number, sq: SquareSource, dets: DetectMeta['detections'], hidden: HiddenHole[], sheet: SheetOutline | null): Points {
  return {
    image: { width: photo.width, height: photo.height, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) },
    // the corners' covariance from the joint edge fit (calibrated against the renderer's truth: npm run bench:vision
    // -- --part calibration)
    reference: { sizeMm, corners: sq.corners.map((c) => [c[0], c[1]]) as Points['reference']['corners'], ...sq.precision },
    holes: dets.map((d) => ({ x: d.x, y: d.y, diameterPx: d.diameterPx, confidence: d.confidence })),
    ...(sheet ? { sheet: sheet.cornersPx.map((c) => [c[0], c[1]]) as NonNullable<Points['sheet']> } : {}),
    ...(hidden.length ? { hidden: hidden.map((q) => ({ x: q.x, y: q.y, diameterPx: q.diameterPx, by: q.by })) } : {}),
  };
}

/**
 * Detects the square and the holes of `pattern` in a photo (image px): load, square, photo quality, holes, the
 * sheet's outline and the holes it or the border hides. Throws VisionInputError for inputs to change.
 */
export async function detectFromImage(bytes: Buffer, pattern: Pattern, opts: DetectOptions): Promise<{ points: Points; meta: DetectMeta }> {
  const clock = stageClock();
  opts.onStage?.('reading photo');
  const photo = await loadPhoto(bytes, { maxPixels: opts.maxPixels ?? DEFAULT_MAX_PIXELS });
  const { grey, width: w, height: h } = photo;
  const factor = Math.max(1, Math.ceil(Math.max(w, h) / 1500));
  const planes: PhotoPlanes = { photo, small: reduce(grey, w, h, factor), factor };
  clock.lap('load');

  opts.onStage?.('finding square');
  const sq = await locateSquare(planes, pattern, opts);
  const S = opts.referenceMm;
  const H = targetToImage(S, sq.corners);
  clock.lap('square');
  const { small } = planes;
  const quality = await measureQuality({ grey, width: w, height: h, small, factor, corners: sq.corners, referenceMm: S, pattern, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}), ...(sq.square.cornerSigmaPx !== undefined ? { cornerSigmaPx: sq.square.cornerSigmaPx } : {}), ...(sq.cutMark === null ? { cutMark: null } : {}) });
  await opts.onQuality?.(quality);
  clock.lap('quality');

  opts.onStage?.('finding holes');
  const detected = sq.square.source === 'detected';
  const { found, partial } = await searchHoles(planes, H, S, pattern, opts.method ?? 'centroid', detected);
  // the sheet only around a square found in the photo: corners marked by hand may lie on anything
  const sheet = detected ? findSheet(grey, w, h, H, S, medianLevel(small.data, 7)) : null;
  const { dets, hidden } = separateHidden(found, partial, w, h, H, sheet);
  clock.lap('holes');
  if (dets.length < MIN_HOLES) {
    throw new VisionInputError('too-few-holes', `Only ${dets.length} hole${dets.length === 1 ? ' was' : 's were'} found; at least ${MIN_HOLES} are needed. Check that the pattern's hole sizes are right, the bed is swept clean and evenly lit, and the photo is sharp.`);
  }
  return {
    points: toPoints(photo, S, sq, dets, hidden, sheet),
    meta: { width: w, height: h, orientation: photo.orientation, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}), bitDepth: photo.bitDepth, format: photo.format, square: sq.square, reduction: factor, mix: photo.mix, detections: dets, hidden, ...(sheet ? { sheet: { cornersPx: sheet.cornersPx, sides: sheet.sides } } : {}), quality, timingsMs: clock.timings },
  };
}

const QUALITY_ONLY = Symbol('quality only');

/**
 * The photo-quality stage alone (decode, square, quality; no holes): what the photo can judge and what to change.
 * Throws VisionInputError only for a file that is no photo at all.
 */
export async function checkPhotoQuality(bytes: Buffer, pattern: Pattern, opts: Omit<DetectOptions, 'onQuality'>): Promise<PhotoQuality> {
  let quality: PhotoQuality | undefined;
  try {
    await detectFromImage(bytes, pattern, {
      ...opts,
      onQuality: (q) => {
        quality = q;
        throw QUALITY_ONLY;
      },
    });
  } catch (e) {
    if (!quality) throw e;
  }
  return quality!;
}

/**
 * Detects and fits: the photo's report (bed frame, mm). Throws VisionInputError for photos to retake and the
 * geometry core's GeometryInputError for a pattern or detections it cannot fit.
 */
export async function analyzeImage(
  bytes: Buffer,
  pattern: Pattern,
  opts: DetectOptions & { analyze?: AnalyzeOptions },
): Promise<{ report: Report; points: Points; meta: DetectMeta }> {
  const { points, meta } = await detectFromImage(bytes, pattern, opts);
  opts.onStage?.('fitting');
  const t = performance.now();
  // loaded on first use: detection alone does not need the measurement core
  const { analyzePoints } = await import('@/lib/geometry');
  const report: Report = { ...analyzePoints(points, pattern, opts.analyze ?? {}), photo: { quality: meta.quality } };
  meta.timingsMs.fit = Math.round((performance.now() - t) * 10) / 10;
  return { report, points, meta };
}
