/**
 * Photo → hole centres: the worker's eyes. `detectFromImage` reads the uploaded bytes, finds the reference square
 * (or takes the user's corners) and every hole, and returns them in the measurement core's Points format
 * (image px, origin top-left, +y down). `analyzeImage` adds the fit and returns the Report.
 */
import type { AnalyzeOptions } from '@/lib/geometry';
import type { Pattern, PhotoQuality, Points, Report } from '@/lib/geometry/contract';
import { VisionInputError } from './errors';
import { homographyFrom4, type Mat3 } from '@/lib/geometry/homography';
import { findHoles, type CentreMethod, type FamilySize, type HoleDetection } from './holes';
import { DEFAULT_MAX_PIXELS, loadPhoto, reduce } from './load';
import { measureQuality } from './quality';
import { findSquare, type Corners } from './square';
import { targetCornersMm } from './target';

export { VisionInputError, type VisionErrorCode } from './errors';
export { DEFAULT_MAX_PIXELS } from './load';

/** Stages reported through `onStage`, in order. */
export type VisionStage = 'reading photo' | 'finding square' | 'finding holes' | 'fitting';

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
    /** 1σ of each corner per image axis, px, from the fitted edges' residuals (not yet passed to the fit). */
    cornerSigmaPx?: number;
  };
  /** Factor of the reduced image for the candidate passes. */
  reduction: number;
  /** Grey channel mix (R, G, B weights). */
  mix: [number, number, number];
  detections: (HoleDetection & { family: string })[];
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
    };
  }
  const S = opts.referenceMm;
  let H: Mat3;
  try {
    H = homographyFrom4(targetCornersMm(S), corners);
  } catch {
    throw new VisionInputError('no-square', 'The four corners given do not form a quadrilateral. Mark them in order around the square.');
  }
  lap('square');
  const quality = await measureQuality({ grey, width: w, height: h, small, factor, corners, referenceMm: S, pattern, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) });
  await opts.onQuality?.(quality);
  lap('quality');

  opts.onStage?.('finding holes');
  // the sheet itself hides what lies under it; only the printed square is kept out of the search
  const m = 0.02 * S;
  const exclude: [number, number][] = [[-m, -m], [S + m, -m], [S + m, S + m], [-m, S + m]];
  const dets = await findHoles(grey, w, h, small, factor, H, familySizes(pattern), { method: opts.method ?? 'centroid', ...(square.source === 'detected' ? { exclude } : {}) });
  lap('holes');
  if (dets.length < MIN_HOLES) {
    throw new VisionInputError('too-few-holes', `Only ${dets.length} hole${dets.length === 1 ? ' was' : 's were'} found; at least ${MIN_HOLES} are needed. Check that the pattern's hole sizes are right, the bed is swept clean and evenly lit, and the photo is sharp.`);
  }
  const points: Points = {
    image: { width: w, height: h, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}) },
    // The corner 1σ stays in the meta only: with lens distortion it reads 2–3× low against the renderer's truth, and
    // the fit would trust it; until it is calibrated the analysis keeps its cautious default.
    reference: { sizeMm: S, corners: corners.map((c) => [c[0], c[1]]) as Points['reference']['corners'] },
    holes: dets.map((d) => ({ x: d.x, y: d.y, diameterPx: d.diameterPx, confidence: d.confidence })),
  };
  return {
    points,
    meta: { width: w, height: h, orientation: photo.orientation, ...(photo.focalPx ? { focalPx: photo.focalPx } : {}), bitDepth: photo.bitDepth, format: photo.format, square, reduction: factor, mix: photo.mix, detections: dets, quality, timingsMs: t },
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
