/**
 * Calibration of photo mode's stated uncertainty (`npm run bench:vision -- --part calibration`, JSON): seeded scenes
 * rendered once and developed through every camera pipeline (lib/vision/render synthesizeCameras), photo → report
 * with analyzeImage, and against the renderer's truth:
 * - RMS of error/σ of scale X, scale Y, squareness and positions (honest: 0.7–1.4), and the stated 1σ of each
 *   (median and largest);
 * - per pipeline the stated scale 1σ and the actual scale error (ppm), and one scene's spread across pipelines;
 * - where the scale error comes from: the reference alone (its detected corners taken onto the bed through the
 *   true camera, each side's length against the printed one) and the rest (the lattice fit and lens);
 * - the same for a plain square with outer edges only (older printed targets), whose edge bias is not measured.
 * Photos are 2000 × 1500 of the small bed, about 0.36–0.40 mm/px like a 12 MP photo of a 1.3 m bed, cached in
 * the temp folder.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Report } from '@/lib/geometry/contract';
import { mulberry32 } from '@/lib/geometry/random';
import { analyzeImage } from '@/lib/vision';
import { CAMERA_PIPELINES, synthesizeCameras, type CameraPipeline, type SceneOptions, type Truth } from '@/lib/vision/render';
import { pixelToBed, type Camera } from '@/lib/vision/render/camera';
import { SMALL_BED } from '../vision/scenes';

const CACHE = path.join(os.tmpdir(), 'gridproof-bench-calibration-v1');

/** Scene `seed` of the calibration set: what matters to the corners and the fit varies with the seed. */
export function calibrationOptions(seed: number, style: 'frame' | 'plain'): Partial<SceneOptions> {
  const r = mulberry32(7000 + seed);
  return {
    width: 2000, height: 1500, supersample: 3, seed: 300 + seed, targetStyle: style,
    tiltDeg: 14 * r(), turnDeg: 16 * r() - 8, focal35mm: 24 + 11 * r(), k1: -0.06 + 0.11 * r(), k2: 0.02 * r(),
    blurPx: 0.4 + 1.0 * r(), noise: 1 + 3 * r(), jpegQuality: 75 + Math.round(20 * r()), exposure: 0.6 + 0.4 * r(),
    lightGradient: 0.3 * r(), vignetting: 0.3 * r(), material: r() < 0.5 ? 'mdf' : 'plywood',
    contrast: 0.3 + 0.4 * r(), sharpenPx: 1 + r(), sharpenAmount: 0.5 + 0.5 * r(),
  };
}

async function scenePhotos(seed: number, style: 'frame' | 'plain'): Promise<{ jpegs: Record<CameraPipeline, Buffer>; truth: Truth }> {
  const dir = path.join(CACHE, `${style}-${seed}`);
  const tf = path.join(dir, 'truth.json');
  if (existsSync(tf)) {
    const jpegs = Object.fromEntries(CAMERA_PIPELINES.map((c) => [c, readFileSync(path.join(dir, `${c}.jpg`))])) as Record<CameraPipeline, Buffer>;
    return { jpegs, truth: JSON.parse(readFileSync(tf, 'utf8')) as Truth };
  }
  const out = await synthesizeCameras(SMALL_BED, calibrationOptions(seed, style));
  mkdirSync(dir, { recursive: true });
  for (const c of CAMERA_PIPELINES) writeFileSync(path.join(dir, `${c}.jpg`), out.jpegs[c]);
  writeFileSync(tf, JSON.stringify(out.truth));
  return out;
}

/**
 * The reference alone: its corners onto the bed through the true camera, then scale X and Y (each pair of opposite
 * sides against the printed size) and squareness (the angles at corners 0 and 2 less those at 1 and 3, over 4, rad);
 * `cov` (the detector's corner covariance, px²) propagated to them through a numerical Jacobian.
 */
function referenceTerms(corners: readonly (readonly [number, number])[], truth: Truth, cov?: readonly number[]): { x: number; y: number; q: number; sigma?: { x: number; y: number; q: number } } {
  const cam: Camera = { ...truth.camera, C: [...truth.camera.C] };
  // in the truth's corner order (corner 0 by the mark): nearest detected corner to each true one
  const idx = truth.target.cornersPx.map((t) => corners.reduce((bi, c, i) => (Math.hypot(c[0] - t[0], c[1] - t[1]) < Math.hypot(corners[bi]![0] - t[0], corners[bi]![1] - t[1]) ? i : bi), 0));
  const S = truth.target.sizeMm;
  const terms = (flat: readonly number[]) => {
    const bed = idx.map((i) => { const o = [0, 0]; pixelToBed(cam, flat[2 * i]!, flat[2 * i + 1]!, o); return o as [number, number]; });
    const len = (a: [number, number], b: [number, number]) => Math.hypot(a[0] - b[0], a[1] - b[1]);
    let q = 0;
    for (let k = 0; k < 4; k++) {
      const a = bed[(k + 3) % 4]!, b = bed[k]!, c = bed[(k + 1) % 4]!;
      const u = [a[0] - b[0], a[1] - b[1]], v = [c[0] - b[0], c[1] - b[1]];
      // the four angles sum to 2π: the shear is what corners 0 and 2 gain over 1 and 3
      q += (k % 2 ? -1 : 1) * Math.acos((u[0]! * v[0]! + u[1]! * v[1]!) / (Math.hypot(u[0]!, u[1]!) * Math.hypot(v[0]!, v[1]!)));
    }
    // the target's +x runs from corner 0 to 1 and +y from 0 to 3; the bed axes differ from it by the sheet's small turn
    return [(len(bed[0]!, bed[1]!) + len(bed[3]!, bed[2]!)) / (2 * S) - 1, (len(bed[0]!, bed[3]!) + len(bed[1]!, bed[2]!)) / (2 * S) - 1, q / 4];
  };
  const flat = corners.flatMap((c) => [c[0], c[1]]);
  const t0 = terms(flat);
  if (!cov) return { x: t0[0]!, y: t0[1]!, q: t0[2]! };
  const J = [0, 1, 2, 3, 4, 5, 6, 7].map((k) => { const f = [...flat]; f[k]! += 1e-3; const t = terms(f); return t.map((v, a) => (v - t0[a]!) / 1e-3); });
  const v = [0, 1, 2].map((a) => { let s = 0; for (let k = 0; k < 8; k++) for (let l = 0; l < 8; l++) s += J[k]![a]! * cov[k * 8 + l]! * J[l]![a]!; return Math.sqrt(Math.max(0, s)); });
  return { x: t0[0]!, y: t0[1]!, q: t0[2]!, sigma: { x: v[0]!, y: v[1]!, q: v[2]! } };
}

/** Sum of squared error/σ over the measured positions, after the one rigid motion between report and truth; their σ (mm). */
function positionZ(report: Report, truth: Truth): { sumZ2: number; n: number; sigmaMm: number[] } {
  const rows = report.positions.flatMap((p) => {
    const t = truth.holes.find((h) => h.family === p.family && h.col === p.col && h.row === p.row);
    return p.measured && p.uncertaintyMm && t?.visible ? [{ m: p.measured, u: p.uncertaintyMm, t: t.bed }] : [];
  });
  const n = rows.length;
  if (n < 3) return { sumZ2: 0, n: 0, sigmaMm: [] };
  const mx = rows.reduce((s, r) => s + r.m.x, 0) / n, my = rows.reduce((s, r) => s + r.m.y, 0) / n;
  const tx = rows.reduce((s, r) => s + r.t.x, 0) / n, ty = rows.reduce((s, r) => s + r.t.y, 0) / n;
  let sc = 0, ss = 0;
  for (const r of rows) { const px = r.t.x - tx, py = r.t.y - ty, qx = r.m.x - mx, qy = r.m.y - my; sc += px * qx + py * qy; ss += px * qy - py * qx; }
  const th = Math.atan2(ss, sc), c = Math.cos(th), s = Math.sin(th);
  let z2 = 0;
  for (const r of rows) {
    const px = r.t.x - tx, py = r.t.y - ty;
    z2 += ((c * px - s * py + mx - r.m.x) ** 2 + (s * px + c * py + my - r.m.y) ** 2) / r.u ** 2;
  }
  return { sumZ2: z2, n: 2 * n, sigmaMm: rows.map((r) => r.u) };
}

const rms = (a: number[]) => { const f = a.filter(Number.isFinite); return f.length ? +Math.sqrt(f.reduce((s, v) => s + v * v, 0) / f.length).toFixed(3) : null; };
const med = (a: number[]) => { const s = [...a].sort((x, y) => x - y); return s.length ? s[Math.floor(s.length / 2)]! : NaN; };

/** One style's calibration over `scenes` seeded scenes × every pipeline. */
async function calibrate(style: 'frame' | 'plain', scenes: number) {
  const z = { scaleX: [] as number[], scaleY: [] as number[], squareness: [] as number[] };
  // the reference alone: its error on the bed (true camera) over its corners' stated covariance propagated there
  const zr = { scaleX: [] as number[], scaleY: [] as number[], squareness: [] as number[] };
  let pz2 = 0, pn = 0;
  const stated = { scalePpm: [] as number[], squarenessDeg: [] as number[], positionMm: [] as number[] };
  const per = Object.fromEntries(CAMERA_PIPELINES.map((c) => [c, { stated: [] as number[], err: [] as number[], reference: [] as number[], rest: [] as number[], biasPx: [] as number[], statedCorners: [] as number[], statedFit: [] as number[] }]));
  const spread = { x: [] as number[], y: [] as number[], sq: [] as number[] };
  const failures: string[] = [];
  const ms: number[] = [];
  for (let seed = 1; seed <= scenes; seed++) {
    const { jpegs, truth } = await scenePhotos(seed, style);
    const sx: number[] = [], sy: number[] = [], sq: number[] = [];
    for (const cam of CAMERA_PIPELINES) {
      const t0 = performance.now();
      let res: Awaited<ReturnType<typeof analyzeImage>>;
      try {
        res = await analyzeImage(jpegs[cam], SMALL_BED, { referenceMm: truth.target.sizeMm });
      } catch (e) {
        failures.push(`${style} ${seed} ${cam}: ${(e as Error).message}`);
        continue;
      }
      ms.push(performance.now() - t0);
      const L = res.report.lattice, u = L.uncertainty;
      if (!L.observed || L.scaleX === null || L.scaleY === null || L.squarenessDeg === null || !u.scaleX || !u.scaleY || !u.squarenessDeg) {
        failures.push(`${style} ${seed} ${cam}: shape not observed`);
        continue;
      }
      const ex = L.scaleX - (1 + truth.errors.scaleX), ey = L.scaleY - (1 + truth.errors.scaleY), eq = L.squarenessDeg - truth.errors.squarenessDeg;
      z.scaleX.push(ex / u.scaleX); z.scaleY.push(ey / u.scaleY); z.squareness.push(eq / u.squarenessDeg);
      const p = positionZ(res.report, truth);
      pz2 += p.sumZ2; pn += p.n;
      stated.scalePpm.push(u.scaleX * 1e6, u.scaleY * 1e6); stated.squarenessDeg.push(u.squarenessDeg); stated.positionMm.push(...p.sigmaMm);
      const ref = referenceTerms(res.points.reference.corners, truth, res.points.reference.cornerCovPx2);
      if (ref.sigma) { zr.scaleX.push(ref.x / ref.sigma.x); zr.scaleY.push(ref.y / ref.sigma.y); zr.squareness.push(ref.q / ref.sigma.q); }
      const P = per[cam]!;
      P.stated.push(u.scaleX * 1e6, u.scaleY * 1e6);
      P.err.push(ex * 1e6, ey * 1e6);
      // a reference that reads long makes the lattice read short
      P.reference.push(-ref.x * 1e6, -ref.y * 1e6);
      P.rest.push((ex + ref.x) * 1e6, (ey + ref.y) * 1e6);
      if (res.meta.square.edgeBiasPx !== undefined) P.biasPx.push(res.meta.square.edgeBiasPx);
      const parts = (res.report.diagnostics as { scaleSigmaParts?: { corners: number; fit: number } } | undefined)?.scaleSigmaParts;
      if (parts) { P.statedCorners.push(parts.corners * 1e6); P.statedFit.push(parts.fit * 1e6); }
      sx.push(ex * 1e6); sy.push(ey * 1e6); sq.push(eq);
    }
    if (sx.length > 1) { spread.x.push(Math.max(...sx) - Math.min(...sx)); spread.y.push(Math.max(...sy) - Math.min(...sy)); spread.sq.push(Math.max(...sq) - Math.min(...sq)); }
  }
  return {
    style, scenes, photos: z.scaleX.length, failures,
    rmsErrorOverSigma: { scaleX: rms(z.scaleX), scaleY: rms(z.scaleY), squareness: rms(z.squareness), positions: pn ? +Math.sqrt(pz2 / pn).toFixed(3) : null },
    stated1Sigma: Object.fromEntries(Object.entries(stated).map(([k, v]) => [k, { median: +med(v).toPrecision(3), max: +Math.max(...v).toPrecision(3) }])),
    referenceAloneRmsErrorOverSigma: { scaleX: rms(zr.scaleX), scaleY: rms(zr.scaleY), squareness: rms(zr.squareness) },
    perPipeline: Object.fromEntries(CAMERA_PIPELINES.map((c) => {
      const P = per[c]!;
      return [c, {
        stated1SigmaScalePpm: { median: Math.round(med(P.stated)), max: Math.round(Math.max(...P.stated)) },
        scaleErrorPpm: { rms: rms(P.err), maxAbs: Math.round(Math.max(...P.err.map(Math.abs))) },
        fromReferencePpm: { rms: rms(P.reference), stated1SigmaRms: rms(P.statedCorners) }, fromFitPpm: { rms: rms(P.rest), stated1SigmaRms: rms(P.statedFit) },
        ...(P.biasPx.length ? { edgeBiasPx: { median: +med(P.biasPx).toFixed(3), min: +Math.min(...P.biasPx).toFixed(3), max: +Math.max(...P.biasPx).toFixed(3) } } : {}),
      }];
    })),
    spreadAcrossPipelines: { scaleXPpm: { median: Math.round(med(spread.x)), max: Math.round(Math.max(...spread.x)) }, scaleYPpm: { median: Math.round(med(spread.y)), max: Math.round(Math.max(...spread.y)) }, squarenessDeg: { max: +Math.max(...spread.sq).toFixed(4) } },
    photoToReportMs: { median: Math.round(med(ms)) },
  };
}

/** The calibration part: `scenes` framed-target scenes and `plainScenes` plain-square scenes, each × 3 pipelines. */
export async function calibrationPart(scenes = 30, plainScenes = 4): Promise<Record<string, unknown>> {
  mkdirSync(CACHE, { recursive: true });
  const t0 = performance.now();
  const frame = await calibrate('frame', scenes);
  const plain = plainScenes > 0 ? await calibrate('plain', plainScenes) : null;
  return { part: 'calibration', target: 'RMS error/σ 0.7–1.4; stated scale 1σ ≤ 150 ppm at 0.36 mm/px', mmPerPx: '0.36–0.40', frame, ...(plain ? { plain } : {}), totalSeconds: Math.round((performance.now() - t0) / 1000) };
}
