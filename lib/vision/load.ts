/**
 * Loading a photo: refuse what we cannot or should not decode, apply the EXIF orientation, convert to sRGB
 * (CMYK through its profile), mix the channels into one grey plane and read the focal length.
 *
 * Output frame: the upright image (after EXIF orientation), px, origin top-left, +y down. Grey values are on a
 * 0–255 scale as Float32 (16-bit sources keep their precision). Only the focal-length tags are read from EXIF:
 * location tags are never parsed, kept or returned.
 */
import exifr from 'exifr';
import sharp, { type Metadata, type OutputInfo } from 'sharp';
import { VisionInputError } from './errors';

/** Default decompression-bomb limit: 50 MP is above any phone camera's still. */
export const DEFAULT_MAX_PIXELS = 50_000_000;

/** Diagonal of the 35 mm film frame (36 × 24 mm), mm. */
export const FULL_FRAME_DIAGONAL_MM = Math.hypot(36, 24);

export interface LoadedPhoto {
  grey: Float32Array;
  width: number;
  height: number;
  /** EXIF orientation of the file (1–8), already applied to `grey`. */
  orientation: number;
  /** Focal length in px from the 35 mm-equivalent focal length and the image diagonal, when EXIF gives it. */
  focalPx?: number;
  /** Weights of R, G, B in the grey mix (sum 1). */
  mix: [number, number, number];
  bitDepth: 8 | 16;
  format: string;
}

const HEIF_BRANDS = new Set(['heic', 'heix', 'hevc', 'hevx', 'heim', 'heis', 'hevm', 'hevs']);

/** Does the file start with an ISO-BMFF `ftyp` box naming an HEIF/HEVC brand (and not AVIF)? */
export function isHeic(bytes: Uint8Array): boolean {
  if (bytes.length < 16) return false;
  const tag = String.fromCharCode(bytes[4]!, bytes[5]!, bytes[6]!, bytes[7]!);
  if (tag !== 'ftyp') return false;
  const size = Math.min(bytes.length, (bytes[0]! << 24) | (bytes[1]! << 16) | (bytes[2]! << 8) | bytes[3]!);
  const brands: string[] = [];
  for (let o = 8; o + 4 <= size; o += 4) {
    if (o === 12) continue; // minor version
    brands.push(String.fromCharCode(bytes[o]!, bytes[o + 1]!, bytes[o + 2]!, bytes[o + 3]!));
  }
  if (brands.includes('avif') || brands.includes('avis')) return false;
  return brands.some((b) => HEIF_BRANDS.has(b)) || brands[0] === 'mif1' || brands[0] === 'msf1';
}

/**
 * Channel weights that give dark holes the most contrast against the surface: a dark hole is near black in every
 * channel, so its contrast in a channel is that channel's level of the surface; with equal noise per channel the
 * best linear mix (matched filter) weighs each channel by that level. Surface levels are the channel medians.
 */
export function holeContrastMix(rgb: ArrayLike<number>, pixels: number, stride = 3): [number, number, number] {
  const step = Math.max(1, Math.floor(pixels / 20000));
  const hist = [new Uint32Array(256), new Uint32Array(256), new Uint32Array(256)];
  let n = 0;
  let max = 0;
  for (let i = 0; i < pixels; i += step) for (let c = 0; c < 3; c++) max = Math.max(max, rgb[i * stride + c]!);
  const scale = max > 255 ? 255 / 65535 : 1;
  for (let i = 0; i < pixels; i += step, n++) for (let c = 0; c < 3; c++) hist[c]![Math.min(255, Math.round(rgb[i * stride + c]! * scale))]!++;
  const med = hist.map((h) => {
    let acc = 0;
    for (let v = 0; v < 256; v++) if ((acc += h[v]!) >= n / 2) return v;
    return 255;
  });
  const s = med[0]! + med[1]! + med[2]!;
  if (s <= 0) return [1 / 3, 1 / 3, 1 / 3];
  return [med[0]! / s, med[1]! / s, med[2]! / s];
}

/** Reads the photo; throws VisionInputError for inputs the user must change. */
export async function loadPhoto(bytes: Buffer, opts: { maxPixels?: number } = {}): Promise<LoadedPhoto> {
  const maxPixels = opts.maxPixels ?? DEFAULT_MAX_PIXELS;
  if (isHeic(bytes)) {
    throw new VisionInputError('heic-unsupported', 'This photo is HEIC/HEIF, which Gridproof cannot read. Export it as JPEG (on a phone: share → "Most compatible", or set the camera to JPEG) and upload again.');
  }
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch {
    throw new VisionInputError('unreadable-image', 'This file could not be read as a photo. Upload a JPEG, PNG, WebP or TIFF image.');
  }
  if (!meta.width || !meta.height || !['jpeg', 'png', 'webp', 'tiff'].includes(meta.format ?? '')) {
    if (meta.format === 'heif') throw new VisionInputError('heic-unsupported', 'This photo is HEIF, which Gridproof cannot read. Export it as JPEG and upload again.');
    throw new VisionInputError('unreadable-image', `This file could not be read as a photo${meta.format ? ` (${meta.format})` : ''}. Upload a JPEG, PNG, WebP or TIFF image.`);
  }
  if (meta.width * meta.height > maxPixels) {
    throw new VisionInputError('too-many-pixels', `The photo has ${(meta.width * meta.height / 1e6).toFixed(1)} megapixels; at most ${(maxPixels / 1e6).toFixed(0)} are accepted. Upload the camera's original JPEG or a smaller export.`);
  }
  const orientation = meta.orientation ?? 1;
  const sixteen = meta.depth === 'ushort' || meta.depth === 'short';
  let data: Buffer;
  let info: OutputInfo;
  try {
    // one decode, read top to bottom (libvips streams the JPEG instead of holding a random-access copy)
    const img = sharp(bytes, { limitInputPixels: maxPixels, failOn: 'error', sequentialRead: true }).rotate().removeAlpha().toColourspace(sixteen ? 'rgb16' : 'srgb');
    ({ data, info } = await img.raw(sixteen ? { depth: 'ushort' } : {}).toBuffer({ resolveWithObject: true }));
  } catch (e) {
    const m = e instanceof Error ? e.message : '';
    if (/pixel limit/i.test(m)) throw new VisionInputError('too-many-pixels', `The photo is larger than ${(maxPixels / 1e6).toFixed(0)} megapixels.`);
    throw new VisionInputError('unreadable-image', 'This photo is damaged or cut short and could not be decoded. Upload the original file again.');
  }
  const w = info.width;
  const h = info.height;
  const ch = info.channels;
  const px = w * h;
  const src = sixteen ? new Uint16Array(data.buffer, data.byteOffset, data.length / 2) : new Uint8Array(data.buffer, data.byteOffset, data.length);
  const grey = new Float32Array(px);
  let mix: [number, number, number] = [1 / 3, 1 / 3, 1 / 3];
  const k = sixteen ? 255 / 65535 : 1;
  if (ch >= 3) {
    mix = holeContrastMix(src, px, ch);
    // one loop per element type: a loop that sees both (Buffer and Uint16Array) runs several times slower
    if (src instanceof Uint8Array) mixGrey8(src, grey, px, ch, mix[0] * k, mix[1] * k, mix[2] * k);
    else mixGrey16(src, grey, px, ch, mix[0] * k, mix[1] * k, mix[2] * k);
  } else for (let i = 0, j = 0; i < px; i++, j += ch) grey[i] = k * src[j]!;

  let focalPx: number | undefined;
  try {
    const tags = (await exifr.parse(bytes, { pick: ['FocalLengthIn35mmFormat', 'FocalLength', 'FocalPlaneXResolution', 'FocalPlaneResolutionUnit'], gps: false, xmp: false, icc: false, iptc: false })) as Record<string, unknown> | undefined;
    const f35 = Number(tags?.FocalLengthIn35mmFormat);
    if (Number.isFinite(f35) && f35 > 5 && f35 < 400) focalPx = (f35 / FULL_FRAME_DIAGONAL_MM) * Math.hypot(w, h);
  } catch {
    // no usable EXIF: the camera model estimates the focal length or does without
  }
  return { grey, width: w, height: h, orientation, ...(focalPx ? { focalPx } : {}), mix, bitDepth: sixteen ? 16 : 8, format: meta.format ?? 'unknown' };
}

function mixGrey8(src: Uint8Array, grey: Float32Array, px: number, ch: number, a: number, b: number, c: number): void {
  for (let i = 0, j = 0; i < px; i++, j += ch) grey[i] = a * src[j]! + b * src[j + 1]! + c * src[j + 2]!;
}

function mixGrey16(src: Uint16Array, grey: Float32Array, px: number, ch: number, a: number, b: number, c: number): void {
  for (let i = 0, j = 0; i < px; i++, j += ch) grey[i] = a * src[j]! + b * src[j + 1]! + c * src[j + 2]!;
}

/** Median grey level (0–255) of an 8-bit image, from a histogram of every `stride`-th px. */
export function medianLevel(data: Uint8Array, stride: number): number {
  const hist = new Uint32Array(256);
  for (let i = 0; i < data.length; i += stride) hist[data[i]!]!++;
  let acc = 0;
  const half = hist.reduce((x, y) => x + y, 0) / 2;
  for (let v = 0; v < 256; v++) if ((acc += hist[v]!) >= half) return v;
  return 255;
}

/** Box-averaged reduction by an integer factor, to 8 bit (for the candidate passes). */
export function reduce(grey: Float32Array, w: number, h: number, factor: number): { data: Uint8Array; width: number; height: number } {
  const W = Math.floor(w / factor);
  const Hh = Math.floor(h / factor);
  const out = new Uint8Array(W * Hh);
  const row = new Float32Array(W);
  const inv = 1 / (factor * factor);
  for (let y = 0; y < Hh; y++) {
    row.fill(0);
    for (let dy = 0; dy < factor; dy++) {
      const o = (y * factor + dy) * w;
      if (factor === 3) {
        // the usual factor for a 12 MP photo, unrolled (same sums in the same order)
        for (let x = 0, b = o; x < W; x++, b += 3) row[x]! += grey[b]! + grey[b + 1]! + grey[b + 2]!;
        continue;
      }
      for (let x = 0; x < W; x++) {
        let s = 0;
        const b = o + x * factor;
        for (let dx = 0; dx < factor; dx++) s += grey[b + dx]!;
        row[x]! += s;
      }
    }
    for (let x = 0; x < W; x++) out[y * W + x] = Math.min(255, Math.round(row[x]! * inv));
  }
  return { data: out, width: W, height: Hh };
}
