/**
 * Benchmark of the measurement core (prints JSON): time of analyzePoints at about 256, 1,000 and 5,000 holes, and
 * accuracy on seeded synthetic scenes at 0.33 mm/px with 0.08 px centre noise (camera tilted 10°, Brown–Conrady
 * distortion, panels shifted and turned, lattice scale and squareness errors, 3 % missing, 5 % spurious), and the
 * calibration of the stated uncertainty: over 60 seeded scenes that vary bed size, square size, image scale, tilt,
 * centre and corner noise, the RMS of error/σ of scale X, scale Y, squareness and positions (honest: 0.7–1.4), the
 * stated scale 1σ of a 150 mm square at 0.36 mm/px with the vision detector's corner precision, and the positions
 * too close to call with a 4 in square on a 36 × 24 in bed.
 * Run: npm run bench:fit [-- --part timing,accuracy,calibration]
 */
import { analyzePoints } from '../../lib/geometry/analyze';
import { buildLattice } from '../../lib/geometry/lattice';
import { PRESETS } from '../../lib/geometry/presets';
import { makeScene, type Scene, type SceneSpec } from '../../lib/geometry/synthetic';
import { mulberry32 } from '../../lib/geometry/random';
import { patternToMm } from '../../lib/geometry/units';
import { fitAffine } from '../../lib/geometry/affine';
import { rigid2, umeyama } from '../../lib/geometry/umeyama';
import type { Pattern, Report } from '../../lib/geometry/contract';
import { exitWithUsageError, parseCliArgs } from '../../lib/cli/args';

const m6 = PRESETS.find((p) => p.id === 'm6-50')!;
const bed = (side: number): Pattern => m6.size({ bedWidthMm: side, bedHeightMm: side, stripWidthMm: side / 8 });

const sceneSpec = (pattern: Pattern, seed: number, cornerNoisePx: number): SceneSpec => ({
  pattern, seed, mmPerPx: 0.33, tiltDeg: 10, k1: -0.05, k2: 0.01, rollDeg: 3,
  scaleX: 1.001, scaleY: 0.9993, squarenessDeg: 0.05,
  panelShiftMm: 1, panelTurnDeg: 0.1, panelTrendMmPerM: { x: 0.3, y: -0.2 },
  centreNoisePx: 0.08, cornerNoisePx, missingFraction: 0.03, spuriousFraction: 0.05,
  square: { sizeMm: 150, x: 0.3 * Number(pattern.bed.width), y: 0.3 * Number(pattern.bed.height), angleDeg: 6 },
});

function median(a: number[]): number { const s = [...a].sort((x, y) => x - y); return s[Math.floor(s.length / 2)]!; }

function timing() {
  // Wall time and process CPU time (user + system, all threads): on a shared machine the CPU figure is the steadier.
  const out: { holes: number; positions: number; panels: number; medianMs: number; minMs: number; medianCpuMs: number }[] = [];
  for (const side of [800, 1600, 3550]) {
    const pattern = bed(side);
    const scene = makeScene(sceneSpec(pattern, 1, 0.1));
    const runs: number[] = [], cpu: number[] = [];
    for (let k = 0; k < 3; k++) analyzePoints(scene.points, pattern);
    for (let k = 0; k < 9; k++) {
      const c0 = process.cpuUsage(), t0 = performance.now();
      analyzePoints(scene.points, pattern);
      runs.push(performance.now() - t0);
      const c = process.cpuUsage(c0);
      cpu.push((c.user + c.system) / 1000);
    }
    out.push({ holes: scene.points.holes.length, positions: buildLattice(patternToMm(pattern)).positions.length, panels: pattern.panels?.length ?? 1, medianMs: +median(runs).toFixed(2), minMs: +Math.min(...runs).toFixed(2), medianCpuMs: +median(cpu).toFixed(2) });
  }
  return out;
}

/** RMS of measured − true after the best similarity (Umeyama) between them, mm. */
function positionErrors(r: Report, trueXY: Float64Array, seen: Uint8Array) {
  const a: number[][] = [], b: number[][] = [];
  r.positions.forEach((p, i) => { if (p.measured && seen[i]) { a.push([trueXY[2 * i]!, trueXY[2 * i + 1]!]); b.push([p.measured.x, p.measured.y]); } });
  const s = umeyama(a, b);
  let e2 = 0;
  a.forEach((p, k) => { const x = s.c * (s.R[0]![0]! * p[0]! + s.R[0]![1]! * p[1]!) + s.t[0]!, y = s.c * (s.R[1]![0]! * p[0]! + s.R[1]![1]! * p[1]!) + s.t[1]!; e2 += (x - b[k]![0]!) ** 2 + (y - b[k]![1]!) ** 2; });
  const aff = fitAffine(a.map((p) => [p[0]!, p[1]!] as [number, number]), b.map((p) => [p[0]!, p[1]!] as [number, number]));
  let f2 = 0;
  a.forEach((p, k) => { const x = aff.L[0] * p[0]! + aff.L[1] * p[1]! + aff.t[0], y = aff.L[2] * p[0]! + aff.L[3] * p[1]! + aff.t[1]; f2 += (x - b[k]![0]!) ** 2 + (y - b[k]![1]!) ** 2; });
  return { afterSimilarityMm: Math.sqrt(e2 / a.length), afterAffineMm: Math.sqrt(f2 / a.length) };
}

/** Panel offset error (est − truth in the zero-mean gauge) after removing a linear trend over panel centres, RMS mm. */
function panelErrors(r: Report, pattern: Pattern, truth: ReturnType<typeof makeScene>['truth']) {
  const lat = buildLattice(patternToMm(pattern));
  const n = lat.panels.length;
  const xm = lat.panels.reduce((s, p) => s + p.cx, 0) / n, ym = lat.panels.reduce((s, p) => s + p.cy, 0) / n;
  const rm = truth.panelRotRad.reduce((s, v) => s + v, 0) / n;
  const tdx = lat.panels.map((p, j) => truth.panelDx[j]! + rm * (p.cy - ym)), tdy = lat.panels.map((p, j) => truth.panelDy[j]! - rm * (p.cx - xm));
  const mdx = tdx.reduce((a, b) => a + b, 0) / n, mdy = tdy.reduce((a, b) => a + b, 0) / n;
  const ex = r.panels.map((q, j) => q.dx - (tdx[j]! - mdx)), ey = r.panels.map((q, j) => q.dy - (tdy[j]! - mdy));
  const detrend = (e: number[]) => {
    // Least squares e ≈ a + b·(cy − ȳ) (strips stacked along Y).
    let sxx = 0, sxy = 0, se = 0;
    lat.panels.forEach((p, j) => { const u = p.cy - ym; sxx += u * u; sxy += u * e[j]!; se += e[j]!; });
    const b = sxx > 0 ? sxy / sxx : 0, a = se / n;
    return e.map((v, j) => v - a - b * (lat.panels[j]!.cy - ym));
  };
  const rms = (e: number[]) => Math.sqrt(e.reduce((s, v) => s + v * v, 0) / e.length);
  const dx = detrend(ex), dy = detrend(ey);
  return { rawRmsMm: Math.hypot(rms(ex), rms(ey)) / Math.SQRT2, detrendedRmsMm: Math.hypot(rms(dx), rms(dy)) / Math.SQRT2, maxDetrendedMm: Math.max(...dx.map(Math.abs), ...dy.map(Math.abs)) };
}

function accuracy(cornerNoisePx: number, seeds: number[]) {
  const pattern = bed(1600);
  const rows = seeds.map((seed) => {
    const sc = makeScene(sceneSpec(pattern, seed, cornerNoisePx));
    const r = analyzePoints(sc.points, pattern);
    const pe = positionErrors(r, sc.truth.trueXY, sc.truth.seen);
    const pn = panelErrors(r, pattern, sc.truth);
    // Spurious matched: a matched position never seen, or measured > 1 mm from where it truly is.
    const lat = buildLattice(patternToMm(pattern));
    const idx = lat.positions.map((_, i) => i).filter((i) => sc.truth.seen[i] && r.positions[i]!.measured);
    const rg = rigid2(idx.flatMap((i) => [sc.truth.trueXY[2 * i]!, sc.truth.trueXY[2 * i + 1]!]), idx.flatMap((i) => [r.positions[i]!.measured!.x, r.positions[i]!.measured!.y]), idx.length);
    let wrong = 0;
    r.positions.forEach((p, i) => {
      if (!p.measured) return;
      if (!sc.truth.seen[i]) { wrong++; return; }
      const c = Math.cos(rg.angleRad), s = Math.sin(rg.angleRad), x = sc.truth.trueXY[2 * i]!, y = sc.truth.trueXY[2 * i + 1]!;
      if (Math.hypot(c * x - s * y + rg.tx - p.measured.x, s * x + c * y + rg.ty - p.measured.y) > 1) wrong++;
    });
    return {
      seed, holes: sc.points.holes.length, spurious: sc.truth.spurious, matched: r.summary.matched, spuriousMatched: wrong,
      positionRmsAfterSimilarityMm: +pe.afterSimilarityMm.toFixed(4), positionRmsAfterAffineMm: +pe.afterAffineMm.toFixed(4),
      panelRmsMm: +pn.rawRmsMm.toFixed(4), panelRmsDetrendedMm: +pn.detrendedRmsMm.toFixed(4),
      scaleXErrPpm: +((r.lattice.scaleX! - sc.truth.scaleX) * 1e6).toFixed(1), scaleYErrPpm: +((r.lattice.scaleY! - sc.truth.scaleY) * 1e6).toFixed(1),
      squarenessErrDeg: +(r.lattice.squarenessDeg! - sc.truth.squarenessDeg).toFixed(4),
      stated1Sigma: { scalePpm: +(r.lattice.uncertainty.scaleX! * 1e6).toFixed(1), squarenessDeg: +r.lattice.uncertainty.squarenessDeg!.toFixed(4) },
      k1: +r.camera.k1.toFixed(4), focalPx: Math.round(r.camera.focalPx), trueFocalPx: Math.round(sc.truth.camera.fPx),
    };
  });
  const rms = (k: keyof (typeof rows)[number]) => +Math.sqrt(rows.reduce((s, r) => s + (r[k] as number) ** 2, 0) / rows.length).toFixed(4);
  const max = (k: keyof (typeof rows)[number]) => +Math.max(...rows.map((r) => Math.abs(r[k] as number))).toFixed(4);
  return {
    cornerNoisePx, seeds: seeds.length,
    summary: {
      positionRmsAfterSimilarityMm: rms('positionRmsAfterSimilarityMm'), positionRmsAfterAffineMm: rms('positionRmsAfterAffineMm'),
      panelRmsDetrendedMm: rms('panelRmsDetrendedMm'), panelRmsMm: rms('panelRmsMm'),
      scaleErrRmsPpm: +Math.sqrt(rows.reduce((s, r) => s + (r.scaleXErrPpm ** 2 + r.scaleYErrPpm ** 2) / 2, 0) / rows.length).toFixed(1),
      scaleErrMaxPpm: Math.max(max('scaleXErrPpm'), max('scaleYErrPpm')),
      squarenessErrRmsDeg: rms('squarenessErrDeg'), squarenessErrMaxDeg: max('squarenessErrDeg'),
      spuriousMatched: rows.reduce((s, r) => s + r.spuriousMatched, 0),
    },
    runs: rows,
  };
}

/** RMS of (measured − true)/σ over the measured positions, per axis, after the best rigid fit of truth onto measured. */
function positionZ(r: Report, sc: Scene): { sumZ2: number; n: number } {
  const idx = r.positions.map((_, i) => i).filter((i) => r.positions[i]!.measured && sc.truth.seen[i]);
  const t = sc.truth.trueXY;
  const rg = rigid2(idx.flatMap((i) => [t[2 * i]!, t[2 * i + 1]!]), idx.flatMap((i) => [r.positions[i]!.measured!.x, r.positions[i]!.measured!.y]), idx.length);
  const c = Math.cos(rg.angleRad), s = Math.sin(rg.angleRad);
  let sumZ2 = 0;
  for (const i of idx) {
    const p = r.positions[i]!, x = t[2 * i]!, y = t[2 * i + 1]!;
    sumZ2 += ((c * x - s * y + rg.tx - p.measured!.x) ** 2 + (s * x + c * y + rg.ty - p.measured!.y) ** 2) / p.uncertaintyMm! ** 2;
  }
  return { sumZ2, n: 2 * idx.length };
}

/** One seeded scene of the calibration set: everything that matters to the uncertainty varies with the seed. */
function calibrationScene(seed: number): { pattern: Pattern; spec: SceneSpec; cornerNoisePx: number } {
  const r = mulberry32(1000 + seed);
  const side = [800, 1200, 1600, 2400][seed % 4]!;
  const pattern = m6.size({ bedWidthMm: side, bedHeightMm: Math.round(side * (0.6 + 0.4 * r())), stripWidthMm: side / 8 });
  const cornerNoisePx = 0.03 + 0.09 * r();
  const spec: SceneSpec = {
    pattern, seed, mmPerPx: 0.25 + 0.2 * r(), tiltDeg: 20 * r(), tiltAzimuthDeg: 360 * r(), k1: -0.05, k2: 0.01, rollDeg: 10 * r() - 5,
    scaleX: 1 + (r() - 0.5) * 0.004, scaleY: 1 + (r() - 0.5) * 0.004, squarenessDeg: (r() - 0.5) * 0.2,
    panelShiftMm: 1, panelTurnDeg: 0.1, centreNoisePx: 0.03 + 0.12 * r(), cornerNoisePx, missingFraction: 0.03, spuriousFraction: 0.03,
    square: { sizeMm: [100, 150, 250][seed % 3]!, x: (0.2 + 0.2 * r()) * side, y: 0.3 * Number(pattern.bed.height), angleDeg: 20 * r() },
  };
  return { pattern, spec, cornerNoisePx };
}

/** A ±0.2 mm tape between the two farthest seen inserts of one row, read with its own seeded error. */
function tapeAlongRow(pattern: Pattern, sc: Scene, seed: number) {
  const lat = buildLattice(patternToMm(pattern));
  const row = Math.floor(Math.max(...lat.positions.map((q) => q.row)) / 2);
  const seen = lat.positions.map((q, i) => ({ q, i })).filter(({ q, i }) => q.family === 0 && q.row === row && sc.truth.seen[i]);
  const a = seen.reduce((p, c) => (c.q.col < p.q.col ? c : p)), b = seen.reduce((p, c) => (c.q.col > p.q.col ? c : p));
  const t = sc.truth.trueXY, sigmaMm = 0.2;
  const g = mulberry32(5000 + seed);
  const noise = Math.sqrt(-2 * Math.log(1 - g())) * Math.cos(2 * Math.PI * g());
  return { from: a.q.label, to: b.q.label, mm: Math.hypot(t[2 * b.i]! - t[2 * a.i]!, t[2 * b.i + 1]! - t[2 * a.i + 1]!) + sigmaMm * noise, sigmaMm };
}

/**
 * Error over stated σ on the calibration set, `stated`: the points carry the corners' true precision (as the vision
 * detector states it); otherwise the analysis assumes its default.
 */
function calibration(stated: boolean, seeds: number, withDistance = false) {
  const z = { scaleX: [] as number[], scaleY: [] as number[], squareness: [] as number[] };
  let pz2 = 0, pn = 0;
  const scalePpm: number[] = [], errPpm: number[] = [];
  for (let seed = 1; seed <= seeds; seed++) {
    const { pattern, spec, cornerNoisePx } = calibrationScene(seed);
    const sc = makeScene(spec);
    if (stated) sc.points.reference.cornerSigmaPx = cornerNoisePx;
    const r = analyzePoints(sc.points, pattern, withDistance ? { distances: [tapeAlongRow(pattern, sc, seed)] } : {});
    const u = r.lattice.uncertainty;
    z.scaleX.push((r.lattice.scaleX! - sc.truth.scaleX) / u.scaleX!);
    z.scaleY.push((r.lattice.scaleY! - sc.truth.scaleY) / u.scaleY!);
    z.squareness.push((r.lattice.squarenessDeg! - sc.truth.squarenessDeg) / u.squarenessDeg!);
    scalePpm.push(u.scaleX! * 1e6, u.scaleY! * 1e6);
    errPpm.push(Math.abs(r.lattice.scaleX! - sc.truth.scaleX) * 1e6, Math.abs(r.lattice.scaleY! - sc.truth.scaleY) * 1e6);
    const p = positionZ(r, sc);
    pz2 += p.sumZ2; pn += p.n;
  }
  const rms = (a: number[]) => +Math.sqrt(a.reduce((s, v) => s + v * v, 0) / a.length).toFixed(3);
  return {
    cornerSigma: stated ? 'stated (true corner noise)' : 'not stated (default)', scenes: seeds, ...(withDistance ? { distance: '±0.2 mm along the middle row' } : {}),
    rmsErrorOverSigma: { scaleX: rms(z.scaleX), scaleY: rms(z.scaleY), squareness: rms(z.squareness), positions: +Math.sqrt(pz2 / pn).toFixed(3) },
    stated1SigmaScalePpm: { median: +median(scalePpm).toFixed(1), min: +Math.min(...scalePpm).toFixed(1), max: +Math.max(...scalePpm).toFixed(1) },
    scaleErrorPpm: { rms: rms(errPpm), max: +Math.max(...errPpm).toFixed(1) },
  };
}

/** Stated scale 1σ of a 150 mm square at 0.36 mm/px on a 1200 × 900 mm bed, corners of the given precision. */
function target150(cornerSigmaPx: number) {
  const pattern = m6.size({ bedWidthMm: 1200, bedHeightMm: 900, stripWidthMm: 150 });
  const ppm: number[] = [], corners: number[] = [], fit: number[] = [];
  for (const seed of [1, 2, 3, 4, 5]) {
    const sc = makeScene({ pattern, seed, mmPerPx: 0.36, tiltDeg: 5, k1: -0.05, k2: 0.01, centreNoisePx: 0.08, cornerNoisePx: cornerSigmaPx, panelShiftMm: 1, panelTurnDeg: 0.1, missingFraction: 0.03, square: { sizeMm: 150, x: 400, y: 300, angleDeg: 5 } });
    sc.points.reference.cornerSigmaPx = cornerSigmaPx;
    const r = analyzePoints(sc.points, pattern);
    const d = r.diagnostics as { scaleSigmaParts?: { corners: number; fit: number } };
    ppm.push(Math.max(r.lattice.uncertainty.scaleX!, r.lattice.uncertainty.scaleY!) * 1e6);
    if (d.scaleSigmaParts) { corners.push(d.scaleSigmaParts.corners * 1e6); fit.push(d.scaleSigmaParts.fit * 1e6); }
  }
  return {
    cornerSigmaPx, stated1SigmaScalePpm: +median(ppm).toFixed(1), target: 150,
    ...(corners.length ? { fromCornersPpm: +median(corners).toFixed(1), fromFitPpm: +median(fit).toFixed(1) } : {}),
    squareSidePx: Math.round(150 / 0.36),
  };
}

/** Positions too close to call: 4 in square on a 36 × 24 in bed of 1/4-20 inserts on 3 in (true bed within tolerance). */
function fourInchSquare(cornerSigmaPx: number | undefined) {
  const preset = PRESETS.find((p) => p.id === 'in-3-quarter20-dogs')!;
  const pattern = preset.size({ bedWidthMm: 36 * 25.4, bedHeightMm: 24 * 25.4 });
  const marginal: number[] = [];
  let measured = 0;
  for (const seed of [1, 2, 3]) {
    const sc = makeScene({ pattern, seed, mmPerPx: 0.3, tiltDeg: 5, k1: -0.03, centreNoisePx: 0.06, cornerNoisePx: cornerSigmaPx ?? 0.05, holeSigmaMm: 0.02, missingFraction: 0, square: { sizeMm: 101.6, x: 250, y: 200, angleDeg: 4 } });
    if (cornerSigmaPx !== undefined) sc.points.reference.cornerSigmaPx = cornerSigmaPx;
    const r = analyzePoints(sc.points, pattern);
    marginal.push(r.summary.marginal);
    measured = r.summary.matched;
  }
  return { cornerSigmaPx: cornerSigmaPx ?? 'not stated', measured, tooCloseToCall: marginal };
}

const PARTS = ['timing', 'accuracy', 'calibration'];
const cli = { name: 'bench:fit', usage: `Benchmark of the measurement core; prints JSON.\n\n  npm run bench:fit [-- --part ${PARTS.join(',')}]` };
const parts = parseCliArgs(cli, { part: { type: 'string' } }).part?.split(',') ?? PARTS;
const unknownPart = parts.find((p) => !PARTS.includes(p));
if (unknownPart !== undefined) exitWithUsageError(cli.name, `--part: no part "${unknownPart}" (${PARTS.join(', ')})`);
const result: Record<string, unknown> = { bench: 'fit', node: process.version, date: new Date().toISOString() };
if (parts.includes('timing')) {
  const t = timing();
  result.timing = t;
  /** CPU-time growth 1,000 → 5,000 holes divided by the n log n ratio (≤ 1: no faster than n log n). */
  result.growthVsNLogN_1000to5000 = +((t[2]!.medianCpuMs / t[1]!.medianCpuMs) / ((t[2]!.holes * Math.log(t[2]!.holes)) / (t[1]!.holes * Math.log(t[1]!.holes)))).toFixed(3);
}
result.targets = { msAt1000: 50, growth: '≤ n log n (ratio ≤ 1)', positionRmsMm: 0.05, panelDetrendedMm: 0.03, scalePpm: 300, squarenessDeg: 0.02, spuriousMatched: 0, rmsErrorOverSigma: '0.7–1.4', stated1SigmaScalePpmAt150mm036: 150 };
if (parts.includes('accuracy')) {
  result.accuracyExactCorners = accuracy(0, [1, 2, 3, 4, 5]);
  result.accuracyCornerNoise01px = accuracy(0.1, [1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
}
if (parts.includes('calibration')) {
  result.calibrationStated = calibration(true, 60);
  result.calibrationDefault = calibration(false, 60);
  result.calibrationStatedWithDistance = calibration(true, 30, true);
  // The vision detector's corners: 0.036–0.065 px RMS (lib/vision/README.md).
  result.target150mmAt036 = [0.036, 0.05, 0.065, 0.1].map(target150);
  result.fourInchSquareOn36x24in = [fourInchSquare(undefined), fourInchSquare(0.05)];
}
console.log(JSON.stringify(result, null, 2));
