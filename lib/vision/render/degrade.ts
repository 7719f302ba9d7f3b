/**
 * Photos made bad on purpose: degradations applied to a rendered photo (JPEG bytes in, JPEG bytes out), for the
 * quality stage's tests and bench. Each one is what a phone does to a real photo:
 * - `motionBlurPx`, `motionAngleDeg`: the camera moved by that many px during the exposure, along that direction
 *   (image px, angle from +x towards +y): a box average along the path, in linear light (the sensor integrates
 *   light, not encoded values);
 * - `gain`: exposure × gain in linear light, clipped at white (over-exposure when > 1);
 * - `downscale`: resized to that width × height (sharp's Lanczos), as a messenger app or an export does;
 * - `crop`: the photo cut to a rectangle [x, y, width, height] in px (a framing that cuts the target or the bed).
 * Frames: image px, origin top-left, +y down; crop and downscale change the frame (scale and offset given back).
 */
import sharp from 'sharp';

export interface Degradation {
  motionBlurPx?: number;
  motionAngleDeg?: number;
  gain?: number;
  downscale?: { width: number; height: number };
  crop?: { x: number; y: number; width: number; height: number };
  /** JPEG quality of the result (default 90). */
  jpegQuality?: number;
}

const TO_LINEAR = new Float32Array(256).map((_, i) => {
  const c = i / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
});

function encode(l: number): number {
  const c = l <= 0 ? 0 : l >= 1 ? 1 : l;
  const e = c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
  return Math.round(e * 255);
}

/** Box blur along a line of `length` px at `angleDeg`, on one linear plane (bilinear taps every px or less). */
function motionPlane(src: Float32Array, w: number, h: number, length: number, angleDeg: number): Float32Array {
  const out = new Float32Array(w * h);
  const n = Math.max(2, Math.ceil(length) + 1);
  const a = (angleDeg * Math.PI) / 180;
  const taps: [number, number][] = [];
  for (let k = 0; k < n; k++) {
    const t = (k / (n - 1) - 0.5) * length;
    taps.push([t * Math.cos(a), t * Math.sin(a)]);
  }
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      let s = 0;
      for (const [dx, dy] of taps) {
        const xf = Math.min(w - 1.001, Math.max(0, x + dx));
        const yf = Math.min(h - 1.001, Math.max(0, y + dy));
        const x0 = xf | 0;
        const y0 = yf | 0;
        const fx = xf - x0;
        const fy = yf - y0;
        const i = y0 * w + x0;
        const p = src[i]!, q = src[i + 1]!, r = src[i + w]!, u = src[i + w + 1]!;
        s += p + (q - p) * fx + (r - p) * fy + (p - q - r + u) * fx * fy;
      }
      out[y * w + x] = s / n;
    }
  return out;
}

/**
 * Applies the degradations in the order a camera would: motion during the exposure, then the exposure's gain and
 * clipping, then the framing (crop) and the resize of an export. Returns the new JPEG and the map from the
 * original photo's px to the new one's: x' = (x − offset.x + ½) · scale.x − ½ (pixel centres at integers), likewise y.
 */
export async function degrade(jpeg: Buffer, d: Degradation): Promise<{ jpeg: Buffer; scale: [number, number]; offset: [number, number] }> {
  const { data, info } = await sharp(jpeg).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const w = info.width;
  const h = info.height;
  let img: Buffer = data;
  if ((d.motionBlurPx ?? 0) > 0.5 || (d.gain ?? 1) !== 1) {
    const planes = [0, 1, 2].map((c) => {
      const p = new Float32Array(w * h);
      for (let i = 0; i < w * h; i++) p[i] = TO_LINEAR[data[i * 3 + c]!]!;
      return (d.motionBlurPx ?? 0) > 0.5 ? motionPlane(p, w, h, d.motionBlurPx!, d.motionAngleDeg ?? 0) : p;
    });
    const g = d.gain ?? 1;
    img = Buffer.alloc(w * h * 3);
    for (let i = 0; i < w * h; i++) for (let c = 0; c < 3; c++) img[i * 3 + c] = encode(planes[c]![i]! * g);
  }
  let pipe = sharp(img, { raw: { width: w, height: h, channels: 3 } });
  let scale: [number, number] = [1, 1];
  let offset: [number, number] = [0, 0];
  let cw = w;
  let ch = h;
  if (d.crop) {
    pipe = pipe.extract({ left: d.crop.x, top: d.crop.y, width: d.crop.width, height: d.crop.height });
    offset = [d.crop.x, d.crop.y];
    cw = d.crop.width;
    ch = d.crop.height;
  }
  if (d.downscale) {
    // extract and resize in one sharp pipeline: the crop is applied first
    pipe = sharp(await pipe.raw().toBuffer(), { raw: { width: cw, height: ch, channels: 3 } }).resize(d.downscale.width, d.downscale.height, { fit: 'fill' });
    scale = [d.downscale.width / cw, d.downscale.height / ch];
  }
  const out = await pipe.jpeg({ quality: d.jpegQuality ?? 90, chromaSubsampling: '4:2:0' }).toBuffer();
  return { jpeg: out, scale, offset };
}
