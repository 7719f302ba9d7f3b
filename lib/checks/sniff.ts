/**
 * Recognises an image by its first bytes (its signature), never by its name or declared type.
 * Signatures: JPEG FF D8 FF (ITU-T T.81 / JFIF); PNG 89 50 4E 47 0D 0A 1A 0A (ISO/IEC 15948); WebP "RIFF"…"WEBP"
 * (RFC 9649); TIFF "II*\0" / "MM\0*" (TIFF 6.0); HEIF/AVIF "ftyp" box with an image brand (ISO/IEC 23008-12).
 */
export const IMAGE_TYPES = ['image/jpeg', 'image/png', 'image/webp', 'image/tiff', 'image/heic', 'image/avif'] as const;
export type ImageType = (typeof IMAGE_TYPES)[number];

/** Bytes needed to recognise every supported type. */
export const SNIFF_BYTES = 16;

const ascii = (b: Uint8Array, from: number, to: number) => String.fromCharCode(...b.subarray(from, to));

/** The image type whose signature starts `head`, or null. */
export function sniffImageType(head: Uint8Array): ImageType | null {
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return 'image/jpeg';
  if (head.length >= 8 && [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a].every((v, i) => head[i] === v)) return 'image/png';
  if (head.length >= 12 && ascii(head, 0, 4) === 'RIFF' && ascii(head, 8, 12) === 'WEBP') return 'image/webp';
  if (head.length >= 4 && (ascii(head, 0, 4) === 'II*\0' || ascii(head, 0, 4) === 'MM\0*')) return 'image/tiff';
  if (head.length >= 12 && ascii(head, 4, 8) === 'ftyp') {
    const brand = ascii(head, 8, 12);
    if (brand === 'avif' || brand === 'avis') return 'image/avif';
    if (['heic', 'heix', 'heim', 'heis', 'hevc', 'hevx', 'mif1', 'msf1'].includes(brand)) return 'image/heic';
  }
  return null;
}
