/**
 * Renders a scene (see scene.ts) to a photo: per-pixel ray cast through the camera (with its distortion) onto the
 * bed plane, supersampled where an edge crosses the pixel, then light (exposure, gradient, vignetting), defocus
 * blur, sensor noise, sRGB tone curve and JPEG. Image frame: px, origin top-left, +y down; pixel (i, j) covers
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

/** Renders the scene; returns the JPEG bytes (and the raw 8-bit RGB when asked). */
export async function renderScene(scene: Scene, opts: { keepRaw?: boolean } = {}): Promise<{ jpeg: Buffer; raw?: Buffer }> {
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
  for (const p of planes) blurPlane(p, w, h, o.blurPx);
  // noise in linear light (shot + read), then the sRGB curve, 8 bit
  const out = Buffer.alloc(w * h * 3);
  const sig = o.noise / 255;
  for (let i = 0; i < w * h; i++) {
    for (let c = 0; c < 3; c++) {
      const l = planes[c as 0 | 1 | 2][i]!;
      const s = sig * Math.sqrt(0.3 + 1.4 * Math.max(0, l)) * 0.5;
      const e = srgbEncode(l + s * gauss(rng));
      out[i * 3 + c] = Math.round(e * 255);
    }
  }
  const jpeg = await sharp(out, { raw: { width: w, height: h, channels: 3 } }).jpeg({ quality: Math.round(o.jpegQuality), chromaSubsampling: '4:2:0' }).toBuffer();
  return opts.keepRaw ? { jpeg, raw: out } : { jpeg };
}
