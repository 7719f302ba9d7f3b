/**
 * The icon set and the web manifest the built app serves. Checked against the formats' own definitions: an ICO
 * file is an ICONDIR (reserved 0, type 1, image count) followed by 16-byte entries giving each image's size and
 * offset (Microsoft's "Icons" documentation); the manifest's `icons` members give `src`, `sizes` and `type` (W3C
 * Web Application Manifest). Each image is decoded by sharp (libvips), not by our code.
 */
import sharp from 'sharp';
import { describe, expect, inject, it } from 'vitest';

const baseUrl = inject('baseUrl');
const get = async (path: string) => {
  const res = await fetch(baseUrl + path);
  return { res, bytes: Buffer.from(await res.arrayBuffer()) };
};

describe('icons and manifest', () => {
  it('serves /favicon.ico as an ICO whose images decode at the sizes its directory states', async () => {
    const { res, bytes } = await get('/favicon.ico');
    expect(res.status).toBe(200);
    expect(bytes.readUInt16LE(0)).toBe(0);
    expect(bytes.readUInt16LE(2)).toBe(1);
    const count = bytes.readUInt16LE(4);
    expect(count).toBeGreaterThanOrEqual(2);
    for (let i = 0; i < count; i++) {
      const e = 6 + 16 * i;
      const size = bytes.readUInt8(e) || 256;
      const length = bytes.readUInt32LE(e + 8);
      const offset = bytes.readUInt32LE(e + 12);
      const meta = await sharp(bytes.subarray(offset, offset + length)).metadata();
      expect([meta.width, meta.height]).toEqual([size, size]);
    }
  });

  it('links a manifest from every page whose icons load at their stated sizes', async () => {
    const html = await (await fetch(`${baseUrl}/sign-in`)).text();
    const href = /<link[^>]+rel="manifest"[^>]+href="([^"]+)"/.exec(html)?.[1] ?? /<link[^>]+href="([^"]+)"[^>]+rel="manifest"/.exec(html)?.[1];
    expect(href).toBeTruthy();
    const manifest = (await (await fetch(new URL(href!, baseUrl))).json()) as { name: string; start_url: string; icons: { src: string; sizes: string; type: string; purpose?: string }[] };
    expect(manifest.name).toBe('Gridproof');
    expect(manifest.icons.some((i) => i.sizes === '512x512' && i.purpose === 'maskable')).toBe(true);
    for (const icon of manifest.icons) {
      const { res, bytes } = await get(icon.src);
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toContain(icon.type);
      if (icon.sizes === 'any') continue;
      const [w, h] = icon.sizes.split('x').map(Number);
      const meta = await sharp(bytes).metadata();
      expect([meta.width, meta.height]).toEqual([w, h]);
    }
    expect(html).toMatch(/rel="apple-touch-icon"/);
  });
});
