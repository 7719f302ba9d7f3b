/**
 * Renders a scene (see scene.ts) to a photo: per-pixel ray cast through the camera (with its distortion) onto the
 * bed plane, supersampled where an edge crosses the pixel, then light (exposure, gradient, vignetting), and one of
 * the camera pipelines (`CameraPipeline`) that turn the linear light into 8-bit sRGB values, then JPEG:
 * - 'linear' (a plain camera): defocus blur in linear light, sensor noise, sRGB curve;
 * - 'phone': the same, then a mid-tone contrast curve on the encoded values and an unsharp mask (σ `sharpenPx`);
 * - 'encoded': sensor noise, sRGB curve, then the blur applied to the encoded values (a cheap lens model or a
 *   resampling step done on gamma-encoded data).
 * The tone curve and the sharpening move a dark/light edge's half-way crossing; they leave the centre of a
 * symmetric feature (a hole, a stroke's centreline) where it is. Image frame: px, origin top-left, +y down; pixel (i, j) covers
 * [i − 0.5, i + 0.5] × [j − 0.5, j + 0.5], its centre at (i, j), the same convention as OpenCV's moments and the
 * detector.
 */
import sharp from 'sharp';
import { pixelToBed } from './camera';
import { gauss, makeRng } from './rng';
import type { Scene } from './scene';

function srgbEncode(l: number): number {
  const c = l <= 0 ? 0 : l >= 1 ? 1 : l;
  return c <= 0.0031308 ? 12.92 * c : 1.055 * Math.pow(c, 1 / 2.4) - 0.055;
}

function blurPlane(src: Float32Array, w: number, h: number, sigma: number): void {
  if (sigma <= 0.05) return;
  const rad = Math.max(1, Math.ceil(sigma * 3));
  const k = new Float32Array(2 * rad + 1);
  let s = 0;
  for (let i = -rad; i <= rad; i++) s += k[i + rad] = Math.exp((-i * i) / (2 * sigma * sigma));
  for (let i = 0; i < k.length; i++) k[i]! /= s;
  const line = new Float32Array(Math.max(w, h));
  for (let y = 0; y < h; y++) {
    const o = y * w;
    for (let x = 0; x < w; x++) line[x] = src[o + x]!;
    for (let x = 0; x < w; x++) {
      let a = 0;
      for (let i = -rad; i <= rad; i++) {
        const xx = x + i < 0 ? 0 : x + i >= w ? w - 1 : x + i;
        a += k[i + rad]! * line[xx]!;
      }
      src[o + x] = a;
    }
  }
  for (let x = 0; x < w; x++) {
    for (let y = 0; y < h; y++) line[y] = src[y * w + x]!;
    for (let y = 0; y < h; y++) {
      let a = 0;
      for (let i = -rad; i <= rad; i++) {
        const yy = y + i < 0 ? 0 : y + i >= h ? h - 1 : y + i;
        a += k[i + rad]! * line[yy]!;
      }
      src[y * w + x] = a;
    }
  }
}

/** How the camera turns linear light into encoded values (see the file header). */
export const CAMERA_PIPELINES = ['linear', 'phone', 'encoded'] as const;
export type CameraPipeline = (typeof CAMERA_PIPELINES)[number];

/**
 * Mid-tone contrast curve on encoded values in [0, 1]: a blend of the identity with smoothstep (3x² − 2x³), which
 * keeps black, white and mid-grey and steepens the mid-tones by 1 + strength / 2.
 */
export function midToneCurve(x: number, strength: number): number {
  const c = x < 0 ? 0 : x > 1 ? 1 : x;
  return (1 - strength) * c + strength * c * c * (3 - 2 * c);
}

/** Linear-light planes (R, G, B) of the scene: exposure, gradient and vignetting applied, no blur or noise. */
export function renderLinear(scene: Scene): [Float32Array, Float32Array, Float32Array] {
  const o = scene.options;
  const w = o.width;
  const h = o.height;
  const cam = scene.camera;
  const planes = [new Float32Array(w * h), new Float32Array(w * h), new Float32Array(w * h)] as const;
  const col = new Float64Array(3);
  const bed = new Float64Array(2);
  // pass 1: one sample at each pixel centre
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      pixelToBed(cam, x, y, bed);
      scene.shade(bed[0]!, bed[1]!, col);
      const i = y * w + x;
      planes[0][i] = col[0]!;
      planes[1][i] = col[1]!;
      planes[2][i] = col[2]!;
    }
  }
  // pass 2: supersample pixels whose value differs from a neighbour's (an edge crosses them)
  const flag = new Uint8Array(w * h);
  const thr = 0.03;
  const g = planes[1];
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const v = g[i]! + planes[0][i]!;
      if (x + 1 < w && Math.abs(v - g[i + 1]! - planes[0][i + 1]!) > thr) flag[i] = flag[i + 1] = 1;
      if (y + 1 < h && Math.abs(v - g[i + w]! - planes[0][i + w]!) > thr) flag[i] = flag[i + w] = 1;
    }
  const n = Math.max(1, Math.round(o.supersample));
  const acc = new Float64Array(3);
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      if (!flag[i]) continue;
      acc[0] = acc[1] = acc[2] = 0;
      for (let sy = 0; sy < n; sy++)
        for (let sx = 0; sx < n; sx++) {
          pixelToBed(cam, x - 0.5 + (sx + 0.5) / n, y - 0.5 + (sy + 0.5) / n, bed);
          scene.shade(bed[0]!, bed[1]!, col);
          acc[0] += col[0]!;
          acc[1] += col[1]!;
          acc[2] += col[2]!;
        }
      planes[0][i] = acc[0] / (n * n);
      planes[1][i] = acc[1] / (n * n);
      planes[2][i] = acc[2] / (n * n);
    }
  // light: exposure × gradient × vignetting (image space)
  const rng = makeRng(o.seed * 31 + 5);
  const ga = rng() * 2 * Math.PI;
  const gx = Math.cos(ga) * o.lightGradient;
  const gy = Math.sin(ga) * o.lightGradient;
  const rmax2 = (w * w + h * h) / 4;
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const dx = x - w / 2;
      const dy = y - h / 2;
      const L = o.exposure * 1.25 * (1 + (gx * dx) / w + (gy * dy) / h) * (1 - (o.vignetting * (dx * dx + dy * dy)) / rmax2);
      planes[0][i]! *= L;
      planes[1][i]! *= L;
      planes[2][i]! *= L;
    }
  return [planes[0], planes[1], planes[2]];
}

/**
 * Develops linear-light planes through a camera pipeline into 8-bit interleaved RGB. The planes are changed in
 * place (pass copies to develop them again). Noise is seeded from the scene's seed, the same for every pipeline.
 */
export function develop(planes: [Float32Array, Float32Array, Float32Array], o: Scene['options'], pipeline: CameraPipeline): Buffer {
  const w = o.width;
  const h = o.height;
  const rng = makeRng(o.seed * 31 + 11);
  if (pipeline !== 'encoded') for (const p of planes) blurPlane(p, w, h, o.blurPx);
  // noise in linear light (shot + read), then the sRGB curve
  const sig = o.noise / 255;
  for (let i = 0; i < w * h; i++) {
    for (let c = 0; c < 3; c++) {
      const p = planes[c as 0 | 1 | 2];
      const l = p[i]!;
      const s = sig * Math.sqrt(0.3 + 1.4 * Math.max(0, l)) * 0.5;
      p[i] = srgbEncode(l + s * gauss(rng));
    }
  }
  if (pipeline === 'encoded') for (const p of planes) blurPlane(p, w, h, o.blurPx);
  if (pipeline === 'phone') {
    const blurred = new Float32Array(w * h);
    for (const p of planes) {
      for (let i = 0; i < w * h; i++) p[i] = midToneCurve(p[i]!, o.contrast);
      blurred.set(p);
      blurPlane(blurred, w, h, o.sharpenPx);
      for (let i = 0; i < w * h; i++) p[i] = p[i]! + o.sharpenAmount * (p[i]! - blurred[i]!);
    }
  }
  const out = Buffer.alloc(w * h * 3);
  for (let i = 0; i < w * h; i++)
    for (let c = 0; c < 3; c++) {
      const e = planes[c as 0 | 1 | 2][i]!;
      out[i * 3 + c] = Math.round((e < 0 ? 0 : e > 1 ? 1 : e) * 255);
    }
  return out;
}

/** 8-bit RGB → JPEG at the scene's quality (4:2:0 chroma, as cameras write it). */
export async function encodeJpeg(raw: Buffer, o: Scene['options']): Promise<Buffer> {
  return sharp(raw, { raw: { width: o.width, height: o.height, channels: 3 } }).jpeg({ quality: Math.round(o.jpegQuality), chromaSubsampling: '4:2:0' }).toBuffer();
}

/** Renders the scene through its own pipeline (`options.camera`); returns the JPEG bytes (and the raw RGB when asked). */
export async function renderScene(scene: Scene, opts: { keepRaw?: boolean } = {}): Promise<{ jpeg: Buffer; raw?: Buffer }> {
  const o = scene.options;
  const out = develop(renderLinear(scene), o, o.camera);
  const jpeg = await encodeJpeg(out, o);
  return opts.keepRaw ? { jpeg, raw: out } : { jpeg };
}
