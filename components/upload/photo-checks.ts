/**
 * What the upload page can tell about a photo at once, in the browser, before it is sent: its size in px (from
 * decoding it), its type, and whether its EXIF says how it is turned and the lens's focal length. Pure: the facts
 * come from components/upload/PhotoPrecheck.tsx (createImageBitmap, exifr), the words go to the page.
 *
 * The reach from the size alone is the best case: the whole bed spanning `FILL` of the photo's longer side, holes
 * centred to `CENTRE_PX` (2-D RMS, px) as the quality bench measures on sharp rendered photos
 * (tests/bench/quality.bench.ts, README "Photo quality"); ± is twice the 1σ, as on the check's page.
 * Bed mm; image px.
 */

/** Share of the photo's longer side the bed spans when the photo is framed well (common practice: a small margin). */
export const FILL = 0.9;
/** 2-D RMS of a hole position on a sharp photo, px: the quality bench's measured error (README). */
export const CENTRE_PX = 0.06;
/** Fewest px across the smallest holes (the quality stage's limit, lib/vision/quality.ts LIMITS.holeDiameterPx). */
export const MIN_HOLE_PX = 10;

/** The facts read in the browser; null where they could not be read. */
export interface PhotoFacts {
  type: string;
  name: string;
  /** Decoded size, px, as displayed (EXIF orientation applied). */
  width: number | null;
  height: number | null;
  /** EXIF Orientation 1–8, or null when the file has none. */
  orientation: number | null;
  /** EXIF FocalLength (mm) and FocalLengthIn35mmFormat (mm), null when absent. */
  focalMm: number | null;
  focal35mm: number | null;
}

/** The bed the photo is for: outline and smallest hole, mm. */
export interface BedSize { widthMm: number; heightMm: number; smallestHoleMm: number }

export type PhotoCheckCode = 'resolution' | 'type' | 'orientation' | 'focal';
export interface PhotoCheck {
  code: PhotoCheckCode;
  /** 'ok', or 'note' (worth knowing, the check still runs) or 'warn' (a better photo would judge better). */
  level: 'ok' | 'note' | 'warn';
  text: string;
}

const READ = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif', 'image/tiff', 'image/avif'];
const mmText = (v: number) => (v >= 0.1 ? v.toFixed(2) : v.toFixed(3));

/** Best-case ± of a position (mm, 2σ) and px across the smallest hole, for a photo of w × h px of this bed. */
export function reachFromSize(w: number, h: number, bed: BedSize): { plusMinusMm: number; holePx: number; mmPerPx: number } {
  const mmPerPx = Math.max(bed.widthMm, bed.heightMm) / (FILL * Math.max(w, h));
  return { plusMinusMm: 2 * CENTRE_PX * mmPerPx, holePx: bed.smallestHoleMm / mmPerPx, mmPerPx };
}

/** The checks, in the order shown. */
export function photoChecks(f: PhotoFacts, bed: BedSize | null): PhotoCheck[] {
  const out: PhotoCheck[] = [];
  const type = f.type.toLowerCase();
  if (!READ.includes(type)) out.push({ code: 'type', level: 'warn', text: `This file's type (${f.type || 'unknown'}) is not a photo Gridproof reads: use a JPEG, PNG, WebP, HEIC, TIFF or AVIF.` });
  else if (type === 'image/png') out.push({ code: 'type', level: 'note', text: 'A PNG is often a screenshot or an edited copy; the camera\'s own photo (JPEG or HEIC) keeps the full resolution and the lens data.' });
  else out.push({ code: 'type', level: 'ok', text: `${type.replace('image/', '').toUpperCase()} photo.` });

  if (f.width === null || f.height === null) {
    out.push({ code: 'resolution', level: 'note', text: 'This browser cannot show this photo, so its size is not known here; the server reads it and says after the upload what it can judge.' });
  } else if (bed) {
    const r = reachFromSize(f.width, f.height, bed);
    const size = `This photo is ${f.width} × ${f.height} px`;
    if (r.holePx < MIN_HOLE_PX) {
      out.push({ code: 'resolution', level: 'warn', text: `${size}: with the whole bed in the frame the ${bed.smallestHoleMm} mm holes come out only about ${r.holePx.toFixed(0)} px across (at least ${MIN_HOLE_PX} are wanted), and positions can be judged to about ± ${mmText(r.plusMinusMm)} mm at best. Step closer or use the full-resolution photo.` });
    } else {
      out.push({ code: 'resolution', level: r.plusMinusMm > 0.1 ? 'note' : 'ok', text: `${size}: with the whole bed in the frame, positions can be judged to about ± ${mmText(r.plusMinusMm)} mm at best (holes about ${r.holePx.toFixed(0)} px across).${r.plusMinusMm > 0.1 ? ' For tighter clearances, step closer or use the full-resolution photo.' : ''}` });
    }
  } else {
    out.push({ code: 'resolution', level: 'ok', text: `This photo is ${f.width} × ${f.height} px.` });
  }

  out.push(f.orientation !== null
    ? { code: 'orientation', level: 'ok', text: f.orientation === 1 ? 'The photo says it is upright.' : 'The photo says how it is turned; it is turned upright before measuring.' }
    : { code: 'orientation', level: 'note', text: 'The photo does not say how it is turned (no EXIF orientation): fine if it looks upright above; a copy from a messenger or a screenshot loses this.' });

  const focal = f.focal35mm ?? f.focalMm;
  out.push(focal !== null
    ? { code: 'focal', level: 'ok', text: `The lens's focal length is in the photo (${f.focal35mm !== null ? `${Math.round(f.focal35mm)} mm equivalent` : `${f.focalMm!.toFixed(1)} mm`}); the fit starts from it.` }
    : { code: 'focal', level: 'note', text: 'The photo does not carry the lens\'s focal length: the fit assumes a phone\'s usual lens and estimates it. The camera\'s original file keeps it.' });
  return out;
}
