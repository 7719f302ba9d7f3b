/**
 * Writes the app's icon set into public/ from one drawing of Gridproof's mark (a square frame around a 3 × 3
 * lattice of holes, as components/BrandMark.tsx draws it): icon.svg, favicon.ico (16, 32 and 48 px PNG images),
 * the PNG sizes the web manifest names (192, 512, and a maskable 512 whose mark stays inside the central 80 %
 * safe zone of the W3C manifest's maskable purpose) and the 180 px touch icon. Run `npm run -s icons` after
 * changing the mark; the files are committed.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';

const ACCENT = '#1f5c4a';
const PAPER = '#f5f3ec';

/**
 * The mark on a square tile, SVG text.
 * @param inset fraction of the tile's side left around the mark (0.12 for plain icons, larger for maskable)
 * @param rounded whether the tile's own corners are rounded (plain icons) or square (maskable: the platform cuts)
 */
export function markSvg(inset: number, rounded: boolean): string {
  const S = 512;
  const m = S * inset;
  const side = S - 2 * m;
  const stroke = side * 0.11;
  const dots = [0.29, 0.5, 0.71].map((f) => m + f * side);
  const r = side * 0.075;
  const circles = dots.flatMap((x) => dots.map((y) => `<circle cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="${r.toFixed(1)}" fill="${PAPER}"/>`)).join('');
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${S} ${S}">`
    + `<rect width="${S}" height="${S}" rx="${rounded ? S * 0.18 : 0}" fill="${ACCENT}"/>`
    + `<rect x="${(m + stroke / 2).toFixed(1)}" y="${(m + stroke / 2).toFixed(1)}" width="${(side - stroke).toFixed(1)}" height="${(side - stroke).toFixed(1)}" rx="${(side * 0.12).toFixed(1)}" fill="none" stroke="${PAPER}" stroke-width="${stroke.toFixed(1)}"/>`
    + `${circles}</svg>\n`;
}

/**
 * An ICO file holding PNG images (the ICONDIR header, one ICONDIRENTRY per image, then the images; PNG payloads
 * are allowed in ICO since Windows Vista — Microsoft's "Icons" documentation).
 */
export function icoFromPngs(images: { size: number; png: Buffer }[]): Buffer {
  const header = Buffer.alloc(6 + 16 * images.length);
  header.writeUInt16LE(0, 0); // reserved
  header.writeUInt16LE(1, 2); // 1 = icon
  header.writeUInt16LE(images.length, 4);
  let offset = header.length;
  images.forEach(({ size, png }, i) => {
    const e = 6 + 16 * i;
    header.writeUInt8(size >= 256 ? 0 : size, e); // width (0 means 256)
    header.writeUInt8(size >= 256 ? 0 : size, e + 1); // height
    header.writeUInt8(0, e + 2); // no palette
    header.writeUInt8(0, e + 3); // reserved
    header.writeUInt16LE(1, e + 4); // colour planes
    header.writeUInt16LE(32, e + 6); // bits per pixel
    header.writeUInt32LE(png.length, e + 8);
    header.writeUInt32LE(offset, e + 12);
    offset += png.length;
  });
  return Buffer.concat([header, ...images.map((i) => i.png)]);
}

async function main() {
  const dir = join(process.cwd(), 'public');
  const plain = markSvg(0.12, true);
  const maskable = markSvg(0.2, false);
  const png = (svg: string, size: number) => sharp(Buffer.from(svg), { density: 72 * (size / 512) * 4 }).resize(size, size).png({ compressionLevel: 9 }).toBuffer();
  writeFileSync(join(dir, 'icon.svg'), plain);
  writeFileSync(join(dir, 'icon-192.png'), await png(plain, 192));
  writeFileSync(join(dir, 'icon-512.png'), await png(plain, 512));
  writeFileSync(join(dir, 'icon-maskable-512.png'), await png(maskable, 512));
  writeFileSync(join(dir, 'apple-touch-icon.png'), await png(markSvg(0.12, false), 180));
  const sizes = [16, 32, 48];
  writeFileSync(join(dir, 'favicon.ico'), icoFromPngs(await Promise.all(sizes.map(async (size) => ({ size, png: await png(plain, size) })))));
  console.log(JSON.stringify({ wrote: ['icon.svg', 'icon-192.png', 'icon-512.png', 'icon-maskable-512.png', 'apple-touch-icon.png', 'favicon.ico'] }));
}

if (import.meta.url === `file://${process.argv[1]}`) await main();
