/**
 * Draws the photo guide's examples into public/guide/ with our renderer (lib/vision/render) and its degradations
 * (lib/vision/render/degrade.ts): one good photo and, for each issue code of the photo-quality stage, a bad one,
 * each as a small WebP (a close-up of the reference target and a few holes, or the whole frame for the framing
 * issues). Every bad example is first run through the quality stage, which must give its code (else the script
 * fails: the guide never shows an example Gridproof would not call out). Run `npm run -s guide-images`; the files
 * are committed. Image px; the close-up window is centred on the target.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { PatternSchema, type Pattern, type PhotoIssueCode } from '@/lib/geometry/contract';
import { checkPhotoQuality } from '@/lib/vision';
import { synthesize, type SceneOptions, type Truth } from '@/lib/vision/render';
import { degrade, type Degradation } from '@/lib/vision/render/degrade';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const OUT = join(ROOT, 'public/guide');
const load = (f: string): Pattern => PatternSchema.parse(JSON.parse(readFileSync(join(ROOT, 'tests/fixtures/vision', f), 'utf8')));
const SMALL = load('bed-small.json');
const LARGE = load('bed-large.json');
const BASE: Partial<SceneOptions> = { width: 1200, height: 900, supersample: 3, seed: 901, tiltDeg: 3, turnDeg: 2 };

/** Shown size of each example, px (CSS px at 1×; the page scales it down on a phone). */
const SHOW = { width: 480, height: 360 };

interface Example {
  file: string;
  pattern: Pattern;
  options: Partial<SceneOptions>;
  degrade?: Degradation | ((t: Truth) => Degradation);
  /** 'close': a window around the target, 'whole': the whole frame. */
  view: 'close' | 'whole';
  /** Enlarge the close-up without smoothing, so the px show (a low-resolution photo). */
  pixelated?: boolean;
  code?: PhotoIssueCode;
}

const EXAMPLES: Example[] = [
  { file: 'good-close', pattern: SMALL, options: BASE, view: 'close' },
  { file: 'good-whole', pattern: SMALL, options: BASE, view: 'whole' },
  { file: 'blurred', pattern: SMALL, options: { ...BASE, blurPx: 3.5 }, view: 'close', code: 'blurred' },
  { file: 'motion-blur', pattern: SMALL, options: BASE, degrade: { motionBlurPx: 16, motionAngleDeg: 25 }, view: 'close', code: 'motion-blur' },
  { file: 'overexposed', pattern: SMALL, options: BASE, degrade: { gain: 2 }, view: 'close', code: 'overexposed' },
  { file: 'underexposed', pattern: SMALL, options: { ...BASE, exposure: 0.15, noise: 3 }, view: 'close', code: 'underexposed' },
  { file: 'target-small', pattern: LARGE, options: { ...BASE, width: 1600, height: 1200, supersample: 2, targetMm: 100 }, view: 'whole', code: 'target-small' },
  { file: 'holes-small', pattern: LARGE, options: { ...BASE, width: 1800, height: 1350, supersample: 2 }, degrade: { downscale: { width: 1200, height: 900 } }, view: 'close', pixelated: true, code: 'holes-small' },
  { file: 'tilted', pattern: SMALL, options: { ...BASE, tiltDeg: 25, turnDeg: 10 }, view: 'whole', code: 'tilted' },
  {
    file: 'target-cut', pattern: SMALL, options: BASE, view: 'whole', code: 'target-cut',
    degrade: (t) => {
      const xs = t.target.cornersPx.map((c) => c[0]);
      const mid = Math.round((Math.min(...xs) + Math.max(...xs)) / 2);
      return mid > t.image.width / 2 ? { crop: { x: 0, y: 0, width: mid, height: t.image.height } } : { crop: { x: mid, y: 0, width: t.image.width - mid, height: t.image.height } };
    },
  },
  {
    file: 'bed-cut', pattern: SMALL, options: BASE, view: 'whole', code: 'bed-cut',
    // the frame cut to its 70 % nearest the target: the far part of the bed is outside
    degrade: (t) => {
      const cx = t.target.cornersPx.reduce((a, c) => a + c[0] / 4, 0);
      const w = Math.round(0.7 * t.image.width);
      return { crop: { x: cx > t.image.width / 2 ? t.image.width - w : 0, y: 0, width: w, height: t.image.height } };
    },
  },
];

async function main(): Promise<void> {
  mkdirSync(OUT, { recursive: true });
  const report: Record<string, { bytes: number; codes: string[] }> = {};
  for (const ex of EXAMPLES) {
    const { jpeg, truth } = await synthesize(ex.pattern, ex.options);
    const d = typeof ex.degrade === 'function' ? ex.degrade(truth) : ex.degrade;
    const dg = d ? await degrade(jpeg, d) : null;
    const photo = dg ? dg.jpeg : jpeg;
    const q = await checkPhotoQuality(photo, ex.pattern, { referenceMm: truth.target.sizeMm });
    const codes = q.issues.map((i) => i.code);
    if (ex.code && !codes.includes(ex.code)) throw new Error(`${ex.file}: the quality stage gave ${codes.join(', ') || 'no issue'}, not ${ex.code}`);
    if (!ex.code && codes.length) throw new Error(`${ex.file}: a good example got ${codes.join(', ')}`);
    let img = sharp(photo);
    if (ex.view === 'close') {
      const meta = await sharp(photo).metadata();
      const [sx, sy] = dg ? dg.scale : [1, 1];
      const [ox, oy] = dg ? dg.offset : [0, 0];
      const c = truth.target.cornersPx.map(([x, y]) => [(x - ox + 0.5) * sx - 0.5, (y - oy + 0.5) * sy - 0.5] as const);
      const cx = c.reduce((a, p) => a + p[0] / 4, 0);
      const cy = c.reduce((a, p) => a + p[1] / 4, 0);
      const side = Math.max(...c.map((p) => p[0])) - Math.min(...c.map((p) => p[0]));
      // the target and a ring of holes around it, in the shown aspect
      const w = Math.min(meta.width!, Math.round(side * (ex.pixelated ? 1.3 : 2.4)));
      const h = Math.min(meta.height!, Math.round((w * SHOW.height) / SHOW.width));
      const left = Math.max(0, Math.min(meta.width! - w, Math.round(cx - w / 2)));
      const top = Math.max(0, Math.min(meta.height! - h, Math.round(cy - h / 2)));
      img = img.extract({ left, top, width: w, height: h });
      img = sharp(await img.toBuffer()).resize(SHOW.width, SHOW.height, { fit: 'fill', kernel: ex.pixelated ? 'nearest' : 'lanczos3' });
    } else {
      img = img.resize(SHOW.width, SHOW.height, { fit: 'contain', background: '#ffffff' });
    }
    const webp = await img.webp({ quality: 72 }).toBuffer();
    writeFileSync(join(OUT, `${ex.file}.webp`), webp);
    report[ex.file] = { bytes: webp.length, codes };
  }
  process.stdout.write(`${JSON.stringify(report, null, 1)}\n`);
}

await main();
