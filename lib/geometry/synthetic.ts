/**
 * Seeded synthetic scenes for tests and benchmarks: a bed built from a pattern, bent by a known lattice shape,
 * panel offsets and per-hole errors, photographed by a known camera (camera.ts projection: pinhole,
 * Brown–Conrady k1 k2), with centre noise, missing holes, holes hidden under the reference square and
 * spurious detections. Frames: bed mm (origin front-left, +X right, +Y away), image px (top-left, +y down).
 * Invented data, for testing the method only.
 */
import { composeAffine } from './affine';
import { discImageCentroidPx, lookAt, projectBedPoint, type Camera } from './camera';
import type { Pattern, Points } from './contract';
import { buildLattice } from './lattice';
import { mulberry32, normalFrom } from './random';
import { patternToMm } from './units';

export interface SceneSpec {
  pattern: Pattern;
  seed?: number;
  /** Image scale at the bed centre, mm per px (default 0.33). */
  mmPerPx?: number;
  /** Camera tilt from straight down, degrees, toward `tiltAzimuthDeg` (defaults 0, 30). */
  tiltDeg?: number;
  tiltAzimuthDeg?: number;
  /** Bed's turn in the photo, degrees counter-clockwise (default 0). */
  rollDeg?: number;
  k1?: number;
  k2?: number;
  /** Pass the focal length in the points (as from EXIF). */
  exifFocal?: boolean;
  /** True lattice shape about the bed centre. */
  scaleX?: number;
  scaleY?: number;
  squarenessDeg?: number;
  /** Panel offsets: uniform in ±panelShiftMm, turns in ±panelTurnDeg, plus a linear trend (mm per m of panel centre Y). */
  panelShiftMm?: number;
  panelTurnDeg?: number;
  panelTrendMmPerM?: { x: number; y: number };
  /** 1σ of each hole's own position error, mm. */
  holeSigmaMm?: number;
  /** 1σ of detected centre noise and of square corner noise, px. */
  centreNoisePx?: number;
  cornerNoisePx?: number;
  missingFraction?: number;
  spuriousFraction?: number;
  /** Reference square: size and centre (mm, bed frame) and turn (deg); default 150 mm near the front-left quarter. */
  square?: { sizeMm: number; x: number; y: number; angleDeg: number; /** Top face height above the bed, mm (sheet thickness). */ heightMm?: number };
  /** Explicit per-position extra deviations (mm), by position index. */
  extraDeviation?: Map<number, [number, number]>;
}

export interface SceneTruth {
  camera: Camera;
  /** True bed position of every nominal position (lattice order), mm. */
  trueXY: Float64Array;
  /** Position index of each detection (−1 for spurious). */
  detPos: Int32Array;
  seen: Uint8Array;
  hidden: Uint8Array;
  panelDx: Float64Array;
  panelDy: Float64Array;
  panelRotRad: Float64Array;
  scaleX: number;
  scaleY: number;
  squarenessDeg: number;
  spurious: number;
}

export interface Scene { points: Points; truth: SceneTruth }

export function makeScene(spec: SceneSpec): Scene {
  const rand = mulberry32(spec.seed ?? 1);
  const gauss = normalFrom(rand);
  const pm = patternToMm(spec.pattern);
  const lat = buildLattice(pm);
  const mmPerPx = spec.mmPerPx ?? 0.33;
  const bw = pm.bed.width, bh = pm.bed.height;
  const margin = 1.15 + (spec.tiltDeg ?? 0) / 40;
  const W = Math.round((bw / mmPerPx) * margin), H = Math.round((bh / mmPerPx) * margin);
  const fPx = 0.9 * Math.max(W, H);
  const D = fPx * mmPerPx;
  const tilt = ((spec.tiltDeg ?? 0) * Math.PI) / 180, az = ((spec.tiltAzimuthDeg ?? 30) * Math.PI) / 180;
  const target: [number, number, number] = [bw / 2, bh / 2, 0];
  const C: [number, number, number] = [target[0] + D * Math.sin(tilt) * Math.cos(az), target[1] + D * Math.sin(tilt) * Math.sin(az), D * Math.cos(tilt)];
  const pose = lookAt(C, target, ((spec.rollDeg ?? 0) * Math.PI) / 180);
  const camera: Camera = { ...pose, fPx, cx: W / 2, cy: H / 2, k1: spec.k1 ?? 0, k2: spec.k2 ?? 0 };

  const sx = spec.scaleX ?? 1, sy = spec.scaleY ?? 1, sq = ((spec.squarenessDeg ?? 0) * Math.PI) / 180;
  const L = composeAffine({ rotationRad: 0, scaleX: sx, scaleY: sy, squarenessRad: sq });
  const np = lat.panels.length;
  const panelDx = new Float64Array(np), panelDy = new Float64Array(np), panelRot = new Float64Array(np);
  if (np > 1) {
    const ym = lat.panels.reduce((s, p) => s + p.cy, 0) / np;
    lat.panels.forEach((p, j) => {
      const a = spec.panelShiftMm ?? 0, t = spec.panelTurnDeg ?? 0;
      panelDx[j] = (2 * rand() - 1) * a + ((spec.panelTrendMmPerM?.x ?? 0) * (p.cy - ym)) / 1000;
      panelDy[j] = (2 * rand() - 1) * a + ((spec.panelTrendMmPerM?.y ?? 0) * (p.cy - ym)) / 1000;
      panelRot[j] = (((2 * rand() - 1) * t) * Math.PI) / 180;
    });
  }
  const P = lat.positions.length;
  const trueXY = new Float64Array(2 * P);
  const hs = spec.holeSigmaMm ?? 0;
  lat.positions.forEach((q, i) => {
    const pn = lat.panels[q.panel]!;
    const c = Math.cos(panelRot[q.panel]!), s = Math.sin(panelRot[q.panel]!);
    const ax = q.x - pn.cx, ay = q.y - pn.cy;
    const px = pn.cx + c * ax - s * ay + panelDx[q.panel]!, py = pn.cy + s * ax + c * ay + panelDy[q.panel]!;
    const ex = px - bw / 2, ey = py - bh / 2;
    const extra = spec.extraDeviation?.get(i) ?? [0, 0];
    trueXY[2 * i] = bw / 2 + L[0] * ex + L[1] * ey + hs * gauss() + extra[0];
    trueXY[2 * i + 1] = bh / 2 + L[2] * ex + L[3] * ey + hs * gauss() + extra[1];
  });

  const sqs = spec.square ?? { sizeMm: 150, x: bw * 0.3, y: bh * 0.35, angleDeg: 7 };
  const sa = (sqs.angleDeg * Math.PI) / 180;
  const half = sqs.sizeMm / 2;
  const sqBed = [[-half, -half], [half, -half], [half, half], [-half, half]].map(([x, y]) => [sqs.x + Math.cos(sa) * x! - Math.sin(sa) * y!, sqs.y + Math.sin(sa) * x! + Math.cos(sa) * y!] as [number, number]);
  const underSquare = (x: number, y: number, pad: number) => {
    const dx = x - sqs.x, dy = y - sqs.y;
    const u = Math.cos(sa) * dx + Math.sin(sa) * dy, v = -Math.sin(sa) * dx + Math.cos(sa) * dy;
    return Math.abs(u) < half + pad && Math.abs(v) < half + pad;
  };
  const cn = spec.cornerNoisePx ?? 0;
  const start = Math.floor(rand() * 4);
  const corners = [0, 1, 2, 3].map((k) => {
    const [x, y] = sqBed[(start + k) % 4]!;
    const p = projectBedPoint(camera, x, y, sqs.heightMm ?? 0)!;
    return [p[0] + cn * gauss(), p[1] + cn * gauss()] as [number, number];
  }) as [[number, number], [number, number], [number, number], [number, number]];

  const holes: Points['holes'] = [];
  const detPos: number[] = [];
  const seen = new Uint8Array(P), hidden = new Uint8Array(P);
  const noise = spec.centreNoisePx ?? 0;
  const miss = spec.missingFraction ?? 0;
  lat.positions.forEach((q, i) => {
    const x = trueXY[2 * i]!, y = trueXY[2 * i + 1]!;
    const fam = pm.families[q.family]!;
    if (underSquare(x, y, fam.holeDiameter / 2)) { hidden[i] = 1; return; }
    if (rand() < miss) return;
    const p = projectBedPoint(camera, x, y);
    if (!p || p[0] < 0 || p[1] < 0 || p[0] >= W || p[1] >= H) return;
    const p2 = projectBedPoint(camera, x + fam.holeDiameter, y)!;
    const dPx = Math.hypot(p2[0] - p[0], p2[1] - p[1]) * (1 + 0.03 * gauss());
    // a detector measures the centroid of the hole's image, which perspective and the lens move off the centre's image
    const c = discImageCentroidPx((bx, by) => projectBedPoint(camera, bx, by) ?? [NaN, NaN], x, y, fam.holeDiameter / 2);
    holes.push({ x: c[0] + noise * gauss(), y: c[1] + noise * gauss(), diameterPx: dPx });
    detPos.push(i);
    seen[i] = 1;
  });
  const nSp = Math.round((spec.spuriousFraction ?? 0) * holes.length);
  const d0 = pm.families[0]!.holeDiameter;
  for (let k = 0; k < nSp; k++) {
    const x = rand() * bw, y = rand() * bh;
    if (underSquare(x, y, 0)) { k--; continue; }
    const p = projectBedPoint(camera, x, y)!;
    const kind = rand();
    // Dust (small), screw heads (large) and hole-sized chips.
    const scale = kind < 0.4 ? 0.2 + 0.2 * rand() : kind < 0.8 ? 1.8 + 0.7 * rand() : 0.9 + 0.2 * rand();
    // a camera sees nothing beyond its frame (drawn after the random values, so the stream stays the same)
    if (p[0] < 0 || p[1] < 0 || p[0] >= W || p[1] >= H) continue;
    holes.push({ x: p[0], y: p[1], diameterPx: (d0 / mmPerPx) * scale });
    detPos.push(-1);
  }
  // Shuffle detections (seeded).
  const order = holes.map((_, i) => i);
  for (let i = order.length - 1; i > 0; i--) { const j = Math.floor(rand() * (i + 1)); [order[i], order[j]] = [order[j]!, order[i]!]; }
  const points: Points = {
    image: { width: W, height: H, ...(spec.exifFocal ? { focalPx: fPx } : {}) },
    reference: { sizeMm: sqs.sizeMm, corners },
    holes: order.map((i) => holes[i]!),
  };
  return {
    points,
    truth: { camera, trueXY, detPos: Int32Array.from(order.map((i) => detPos[i]!)), seen, hidden, panelDx, panelDy, panelRotRad: panelRot, scaleX: sx, scaleY: sy, squarenessDeg: spec.squarenessDeg ?? 0, spurious: nSp },
  };
}
