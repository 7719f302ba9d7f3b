/**
 * Photo → hole centres: the worker's eyes. `detectFromImage` reads the uploaded bytes, finds the reference square
 * (or takes the user's corners) and every hole, and returns them in the measurement core's Points format
 * (image px, origin top-left, +y down). `analyzeImage` adds the fit and returns the Report.
 */
import type { AnalyzeOptions } from '@/lib/geometry';
import { RIM_MARGIN_PX, type HiddenReason, type Pattern, type PhotoQuality, type Points, type Report } from '@/lib/geometry/contract';
import { VisionInputError } from './errors';
import { homographyFrom4, homographyScale, type Mat3 } from '@/lib/geometry/homography';
import { findHoles, type CentreMethod, type FamilySize, type HoleDetection, type PartialHole } from './holes';
import { findSheet, signedDistanceToOutline, type SheetOutline } from './sheet';
import { DEFAULT_MAX_PIXELS, loadPhoto, medianLevel, reduce } from './load';
import { measureQuality } from './quality';
import { findSquare, type Corners } from './square';
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

/** Detects the square and the holes of `pattern` in a photo. Throws VisionInputError for inputs to change. */
export async function detectFromImage(bytes: Buffer, pattern: Pattern, opts: DetectOptions): Promise<{ points: Points; meta: DetectMeta }> {
  const t: Record<string, number> = {};
  let t0 = performance.now();
  const lap = (k: string) => {
    const n = performance.now();
    t[k] = Math.round((n - t0) * 10) / 10;
    t0 = n;
  };
  opts.onStage?.('reading photo');
  const photo = await loadPhoto(bytes, { maxPixels: opts.maxPixels ?? DEFAULT_MAX_PIXELS });
  const { grey, width: w, height: h } = photo;
  const factor = Math.max(1, Math.ceil(Math.max(w, h) / 1500));
  const small = reduce(grey, w, h, factor);
  lap('load');

  opts.onStage?.('finding square');
  let corners: Corners;
  let square: DetectMeta['square'];
  // the detected corners' precision (none for corners given by hand)
  let precision: Pick<Points['reference'], 'cornerSigmaPx' | 'cornerCovPx2'> = {};
  if (opts.corners) {
    corners = opts.corners;
    square = { source: 'given' };
  } else {
    const sq = await findSquare(grey, w, h, small, factor);
    if (!sq) {
      const quality = await measureQuality({ grey, width: w, height: h, small, factor, corners: null, referenceMm: opts.referenceMm, pattern, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) });
      await opts.onQuality?.(quality);
      throw new VisionInputError('no-square', 'No reference square was found in the photo. Make sure the whole printed square is in view, flat and not glared, or mark its four corners by hand.');
    }
    corners = sq.corners;
    const r3 = (x: number) => Math.round(x * 1000) / 1000;
    square = {
      source: 'detected', kind: sq.kind, markFound: sq.markFound, edgeRmsPx: r3(sq.edgeRmsPx), reference: sq.reference, cornerSigmaPx: r3(sq.cornerSigmaPx),
      ...(sq.edgeBiasPx !== undefined ? { edgeBiasPx: r3(sq.edgeBiasPx), edgeBiasSdPx: r3(sq.edgeBiasSdPx ?? 0) } : {}),
      ...(sq.edgeBiasSigmaPx !== undefined ? { edgeBiasSigmaPx: r3(sq.edgeBiasSigmaPx) } : {}),
    };
    precision = { cornerSigmaPx: Math.max(1e-4, sq.cornerSigmaPx), ...(sq.cornerCovPx2 ? { cornerCovPx2: sq.cornerCovPx2 } : {}) };
  }
  const S = opts.referenceMm;
  let H: Mat3;
  try {
    H = homographyFrom4(targetCornersMm(S), corners);
  } catch {
    throw new VisionInputError('no-square', 'The four corners given do not form a quadrilateral. Mark them in order around the square.');
  }
  lap('square');
  const quality = await measureQuality({ grey, width: w, height: h, small, factor, corners, referenceMm: S, pattern, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}), ...(square.cornerSigmaPx !== undefined ? { cornerSigmaPx: square.cornerSigmaPx } : {}) });
  await opts.onQuality?.(quality);
  lap('quality');

  opts.onStage?.('finding holes');
  // the sheet itself hides what lies under it; only the printed square is kept out of the search
  const m = 0.02 * S;
  const exclude: [number, number][] = [[-m, -m], [S + m, -m], [S + m, S + m], [-m, S + m]];
  const partial: PartialHole[] = [];
  // The candidate pass runs on the reduced image only while the smallest hole keeps 4.5 px across there; a bed with
  // small holes for the photo's scale (M6 on a full sheet) is searched at a finer reduction, down to the full image.
  const families = familySizes(pattern);
  const holePx = Math.min(...families.map((f) => f.diameterMm)) * homographyScale(H, S / 2, S / 2);
  const holeFactor = Math.max(1, Math.min(factor, Math.floor(holePx / 4.5)));
  const holeSmall = holeFactor === factor ? small : reduce(grey, w, h, holeFactor);
  const found = await findHoles(grey, w, h, holeSmall, holeFactor, H, families, { method: opts.method ?? 'centroid', onPartial: (p) => partial.push(p), ...(square.source === 'detected' ? { exclude } : {}) });
  // Holes seen in part are not measured: their rim, with a blur margin, meets the sheet or the photo's border, or is
  // cut over a long arc by something lying over it.
  // (only around a square found in the photo: corners marked by hand may lie on anything)
  const sheet = square.source === 'detected' ? findSheet(grey, w, h, H, S, medianLevel(small.data, 7)) : null;
  const dets: typeof found = [];
  const hidden: HiddenHole[] = [];
  const reasonOf = (x: number, y: number, diameterPx: number, planeMm: [number, number], gapDeg: number): HiddenReason | null => {
    const reachPx = diameterPx / 2 + RIM_MARGIN_PX;
    if (x < reachPx || y < reachPx || x > w - reachPx || y > h - reachPx) return 'border';
    const mmPerPx = 1 / homographyScale(H, planeMm[0], planeMm[1]);
    if (sheet && signedDistanceToOutline(sheet.cornersMm, planeMm[0], planeMm[1]) < reachPx * mmPerPx) return 'sheet';
    return gapDeg >= OCCLUDED_GAP_DEG ? 'occluded' : null;
  };
  for (const d of found) {
    const by = reasonOf(d.x, d.y, d.diameterPx, d.planeMm, d.rimGapDeg);
    if (by) hidden.push({ x: d.x, y: d.y, diameterPx: d.diameterPx, by, family: d.family });
    else dets.push(d);
  }
  for (const p of partial) {
    // a broken rim is one seen in part: by the sheet or the border when they are that near, else by something on it
    if (p.x < 0 || p.y < 0 || p.x > w || p.y > h) continue;
    if (hidden.some((q) => Math.hypot(q.x - p.x, q.y - p.y) < q.diameterPx / 2) || dets.some((q) => Math.hypot(q.x - p.x, q.y - p.y) < q.diameterPx / 2)) continue;
    hidden.push({ x: p.x, y: p.y, diameterPx: p.diameterPx, by: reasonOf(p.x, p.y, p.diameterPx, p.planeMm, 360)! });
  }
  lap('holes');
  if (dets.length < MIN_HOLES) {
    throw new VisionInputError('too-few-holes', `Only ${dets.length} hole${dets.length === 1 ? ' was' : 's were'} found; at least ${MIN_HOLES} are needed. Check that the pattern's hole sizes are right, the bed is swept clean and evenly lit, and the photo is sharp.`);
  }
  const points: Points = {
    image: { width: w, height: h, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) },
    // the corners' covariance from the joint edge fit (calibrated against the renderer's truth: npm run bench:vision
    // -- --part calibration)
    reference: { sizeMm: S, corners: corners.map((c) => [c[0], c[1]]) as Points['reference']['corners'], ...precision },
    holes: dets.map((d) => ({ x: d.x, y: d.y, diameterPx: d.diameterPx, confidence: d.confidence })),
    ...(sheet ? { sheet: sheet.cornersPx.map((c) => [c[0], c[1]]) as NonNullable<Points['sheet']> } : {}),
    ...(hidden.length ? { hidden: hidden.map((q) => ({ x: q.x, y: q.y, diameterPx: q.diameterPx, by: q.by })) } : {}),
  };
  return {
    points,
    meta: { width: w, height: h, orientation: photo.orientation, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}), bitDepth: photo.bitDepth, format: photo.format, square, reduction: factor, mix: photo.mix, detections: dets, hidden, ...(sheet ? { sheet: { cornersPx: sheet.cornersPx, sides: sheet.sides } } : {}), quality, timingsMs: t },
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
