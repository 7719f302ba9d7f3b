/**
 * Scene model of a rendered bed photo: where every hole truly is (nominal + injected errors), the paper target,
 * screws, dust, the camera, and the shading of a bed point. Bed frame: mm, origin front-left, +X right, +Y away.
 *
 * Injected errors, applied in this order to each nominal position p (bed centre c):
 *   lattice:  X = c.x + (1 + scaleX)(p.x − c.x) − (1 + scaleY)·sin(squarenessRad)(p.y − c.y),
 *             Y = c.y + (1 + scaleY)·cos(squarenessRad)(p.y − c.y)
 *             — the report's own terms (lib/geometry/affine.ts composeAffine with no rotation): squareness is the
 *             angle between the lattice's X and Y axes minus 90°, so a report of this scene measures +squarenessDeg.
 *   panel:    rotation by panel.rotationRad about the panel centre, then + (panel.dx, panel.dy)
 *   misplace: + (dx, dy) for the few misplaced positions.
 */
import type { Pattern } from '@/lib/geometry/contract';
import { targetInkAt, PAPER_MARGIN_FRACTION } from '../target';
import { axisAngle, mul3, projectBed, type Camera } from './camera';
import { gauss, makeRng, uniform, valueNoise, type Rng } from './rng';

export interface SceneOptions {
  /** Image size, px. */
  width: number;
  height: number;
  seed: number;
  material: 'mdf' | 'plywood';
  /** Camera tilt away from straight down, degrees (0–25), and turn about the optical axis, degrees. */
  tiltDeg: number;
  turnDeg: number;
  /** 35 mm-equivalent focal length, mm. */
  focal35mm: number;
  /** Radial distortion k1, k2. */
  k1: number;
  k2: number;
  /** Defocus blur, Gaussian sigma in px (0–1.5). */
  blurPx: number;
  /** Camera pipeline from linear light to encoded values (render.ts): 'linear', 'phone' or 'encoded'. */
  camera: 'linear' | 'phone' | 'encoded';
  /** Phone pipeline: mid-tone contrast strength (0–1, render.ts midToneCurve), unsharp-mask sigma (px) and amount. */
  contrast: number;
  sharpenPx: number;
  sharpenAmount: number;
  /** Sensor noise sigma at mid grey, in 8-bit units. */
  noise: number;
  jpegQuality: number;
  /** Overall exposure (1 = normal, 0.35 = low light); light gradient amplitude; vignetting at the corners. */
  exposure: number;
  lightGradient: number;
  vignetting: number;
  /** Dust specks and chips per square metre. */
  dustPerM2: number;
  /** Screws per square metre (countersunk heads, off the lattice). */
  screwsPerM2: number;
  targetMm: number;
  /** Printed target: Gridproof's framed target (target.ts) or an older plain filled square with outer edges only. */
  targetStyle: 'frame' | 'plain';
  /** Target placement: random inside the bed, or next to an edge of the photo. */
  targetPlacement: 'random' | 'edge';
  /** Injected errors. */
  scalePpm: number;
  squarenessDeg: number;
  panelOffsetMm: number;
  misplacedCount: number;
  misplacedMm: number;
  /** Supersampling factor per axis for pixels on an edge. */
  supersample: number;
  /** The sheet the target is printed on, width × height mm (default: A4, or the square and its margin if larger). */
  sheetMm?: [number, number];
  /** Where the square's centre lies on the bed, mm, and its turn, degrees (default: drawn from the seed). */
  targetCentreMm?: [number, number];
  targetRotationDeg?: number;
  /** Objects lying on the bed (clamp bars, a scrap of board), bed mm rectangles, linear reflectance (default 0.06, black): they hide what lies under them. */
  occluders?: { x: number; y: number; width: number; height: number; tone?: number }[];
}

export const DEFAULT_SCENE: SceneOptions = {
  width: 1600,
  height: 1200,
  seed: 1,
  material: 'mdf',
  tiltDeg: 5,
  turnDeg: 3,
  focal35mm: 27,
  k1: -0.03,
  k2: 0.01,
  blurPx: 0.7,
  camera: 'linear',
  contrast: 0.5,
  sharpenPx: 1.5,
  sharpenAmount: 0.8,
  noise: 2,
  jpegQuality: 90,
  exposure: 1,
  lightGradient: 0.15,
  vignetting: 0.2,
  dustPerM2: 400,
  screwsPerM2: 6,
  targetMm: 150,
  targetStyle: 'frame',
  targetPlacement: 'random',
  scalePpm: 400,
  squarenessDeg: 0.03,
  panelOffsetMm: 0.3,
  misplacedCount: 3,
  misplacedMm: 0.8,
  supersample: 4,
};

export interface TruthHole {
  family: string;
  kind: string;
  col: number;
  row: number;
  nominal: { x: number; y: number };
  /** True bed position, mm. */
  bed: { x: number; y: number };
  /** True image position, px (through the camera and its distortion). */
  px: [number, number];
  diameterMm: number;
  visible: boolean;
  hiddenBy?: 'target' | 'channel' | 'outside' | 'occluder';
}

interface Disc {
  x: number;
  y: number;
  r: number;
  kind: 'insert' | 'dog' | 'screw' | 'dust-dark' | 'dust-light';
  /** Outer radius that the feature paints (flange, head), mm. */
  outer: number;
  angle: number;
  tone: number;
}

export interface Scene {
  options: SceneOptions;
  pattern: Pattern;
  camera: Camera;
  holes: TruthHole[];
  /** The square (`sizeMm`, its centre and turn on the bed, corners) and the sheet it is printed on (`sheetMm`, centred on it). */
  target: { sizeMm: number; centreMm: [number, number]; rotationRad: number; cornersBed: [number, number][]; cornersPx: [number, number][]; sheetMm: [number, number] };
  errors: {
    scaleX: number;
    scaleY: number;
    squarenessDeg: number;
    panels: { id: string; dx: number; dy: number; rotationDeg: number }[];
    misplaced: { family: string; col: number; row: number; dx: number; dy: number }[];
  };
  /** Approximate scale at the image centre, mm per px. */
  mmPerPx: number;
  /** Paints a bed point: writes linear RGB reflectance into out. */
  shade: (X: number, Y: number, out: Float64Array) => void;
}

const CELL = 30;

/** Builds the scene for a pattern and options (deterministic for the seed). */
export function buildScene(pattern: Pattern, opts: SceneOptions): Scene {
  const rng = makeRng(opts.seed * 7919 + 17);
  const bw = pattern.bed.width;
  const bh = pattern.bed.height;
  const cx0 = bw / 2;
  const cy0 = bh / 2;
  const scaleX = (uniform(rng, -1, 1) * opts.scalePpm) / 1e6;
  const scaleY = (uniform(rng, -1, 1) * opts.scalePpm) / 1e6;
  const squarenessDeg = uniform(rng, -1, 1) * opts.squarenessDeg;
  const squarenessRad = (squarenessDeg * Math.PI) / 180;
  const yAxis = [-(1 + scaleY) * Math.sin(squarenessRad), (1 + scaleY) * Math.cos(squarenessRad)] as const;
  const panels = (pattern.panels ?? []).map((p) => ({
    ...p,
    dx: uniform(rng, -1, 1) * opts.panelOffsetMm,
    dy: uniform(rng, -1, 1) * opts.panelOffsetMm,
    rotationDeg: uniform(rng, -1, 1) * 0.02,
  }));
  const total = pattern.families.reduce((n, f) => n + f.count.x * f.count.y, 0);
  const misplacedSet = new Map<number, [number, number]>();
  for (let i = 0; i < Math.min(opts.misplacedCount, total); i++) {
    const k = Math.floor(rng() * total);
    const a = rng() * 2 * Math.PI;
    const m = opts.misplacedMm * (0.5 + 0.5 * rng());
    misplacedSet.set(k, [m * Math.cos(a), m * Math.sin(a)]);
  }

  // --- camera -------------------------------------------------------------------------------------------
  const diag = Math.hypot(opts.width, opts.height);
  const focalPx = (opts.focal35mm / Math.hypot(36, 24)) * diag;
  const tilt = (opts.tiltDeg * Math.PI) / 180;
  const az = rng() * 2 * Math.PI;
  const turn = (opts.turnDeg * Math.PI) / 180;
  const R0 = [1, 0, 0, 0, -1, 0, 0, 0, -1];
  const Rt = axisAngle(Math.cos(az), Math.sin(az), 0, tilt);
  const Rz = axisAngle(0, 0, 1, turn);
  const R = mul3(mul3(Rz, Rt), R0);
  const axis = [R[6]!, R[7]!, R[8]!]; // optical axis in world = Rᵀ e_z
  let dist = focalPx * 0.001 * Math.max(bw, bh) * 1.2;
  const cam: Camera = { focalPx, cx: opts.width / 2, cy: opts.height / 2, k1: opts.k1, k2: opts.k2, R, C: [0, 0, 0] };
  for (let it = 0; it < 6; it++) {
    cam.C = [cx0 - dist * axis[0]!, cy0 - dist * axis[1]!, -dist * axis[2]!];
    let worst = 0;
    for (const [X, Y] of [[0, 0], [bw, 0], [bw, bh], [0, bh], [cx0, 0], [cx0, bh], [0, cy0], [bw, cy0]] as const) {
      const p = projectBed(cam, X, Y)!;
      worst = Math.max(worst, Math.abs(p[0] - cam.cx) / (0.47 * opts.width), Math.abs(p[1] - cam.cy) / (0.47 * opts.height));
    }
    dist *= worst;
  }
  cam.C = [cx0 - dist * axis[0]!, cy0 - dist * axis[1]!, -dist * axis[2]!];
  const pc = projectBed(cam, cx0, cy0)!;
  const px1 = projectBed(cam, cx0 + 1, cy0)!;
  const mmPerPx = 1 / Math.hypot(px1[0] - pc[0], px1[1] - pc[1]);

  // --- target -------------------------------------------------------------------------------------------
  const S = opts.targetMm;
  const rot0 = uniform(rng, -0.6, 0.6);
  const rot = opts.targetRotationDeg !== undefined ? (opts.targetRotationDeg * Math.PI) / 180 : rot0;
  const half = S / 2 + PAPER_MARGIN_FRACTION * S + 20;
  let tcx: number;
  let tcy: number;
  if (opts.targetPlacement === 'edge') {
    // push the square towards a photo edge: find the bed point under a spot near the border
    const side = Math.floor(rng() * 4);
    const marginPx = (S * 0.75) / mmPerPx + 0.02 * Math.min(opts.width, opts.height);
    const u = side === 0 ? marginPx : side === 1 ? opts.width - marginPx : uniform(rng, 0.3, 0.7) * opts.width;
    const v = side === 2 ? marginPx : side === 3 ? opts.height - marginPx : uniform(rng, 0.3, 0.7) * opts.height;
    const o = [0, 0];
    // pixelToBed without distortion is fine for a placement
    const xd = (u - cam.cx) / focalPx;
    const yd = (v - cam.cy) / focalPx;
    const wx = R[0]! * xd + R[3]! * yd + R[6]!;
    const wy = R[1]! * xd + R[4]! * yd + R[7]!;
    const wz = R[2]! * xd + R[5]! * yd + R[8]!;
    const t = -cam.C[2] / wz;
    o[0] = cam.C[0] + t * wx;
    o[1] = cam.C[1] + t * wy;
    tcx = o[0]!;
    tcy = o[1]!;
  } else {
    tcx = uniform(rng, half, Math.max(half, bw - half));
    tcy = uniform(rng, half, Math.max(half, bh - half));
  }
  if (opts.targetCentreMm) [tcx, tcy] = opts.targetCentreMm;
  const cr = Math.cos(rot);
  const sr = Math.sin(rot);
  const toBed = (x: number, y: number): [number, number] => {
    const lx = x - S / 2;
    const ly = y - S / 2;
    return [tcx + cr * lx - sr * ly, tcy + sr * lx + cr * ly];
  };
  const cornersBed = ([[0, 0], [S, 0], [S, S], [0, S]] as const).map(([x, y]) => toBed(x, y));
  const cornersPx = cornersBed.map(([X, Y]) => projectBed(cam, X, Y)!);
  const paperHalfW = opts.sheetMm ? opts.sheetMm[0] / 2 : S / 2 + Math.max(PAPER_MARGIN_FRACTION * S, (210 - S) / 2);
  const paperHalfH = opts.sheetMm ? opts.sheetMm[1] / 2 : S / 2 + Math.max(PAPER_MARGIN_FRACTION * S, (297 - S) / 2);
  const occluders = opts.occluders ?? [];
  const occluderAt = (X: number, Y: number) => occluders.find((o) => X >= o.x && X <= o.x + o.width && Y >= o.y && Y <= o.y + o.height);
  const underOccluder = (X: number, Y: number) => occluderAt(X, Y) !== undefined;
  const underPaper = (X: number, Y: number): [number, number] | null => {
    const dx = X - tcx;
    const dy = Y - tcy;
    const lx = cr * dx + sr * dy;
    const ly = -sr * dx + cr * dy;
    if (Math.abs(lx) > paperHalfW || Math.abs(ly) > paperHalfH) return null;
    return [lx + S / 2, ly + S / 2];
  };

  const channels = pattern.channels ?? [];
  const inChannel = (X: number, Y: number): number => {
    for (let i = 0; i < channels.length; i++) {
      const c = channels[i]!;
      if (X >= c.x && X <= c.x + c.width && Y >= c.y && Y <= c.y + c.height) return i;
    }
    return -1;
  };

  // --- holes --------------------------------------------------------------------------------------------
  const holes: TruthHole[] = [];
  const misplaced: Scene['errors']['misplaced'] = [];
  const grid = new Map<number, Disc[]>();
  const key = (ix: number, iy: number) => ix * 100003 + iy;
  const addDisc = (d: Disc) => {
    const x0 = Math.floor((d.x - d.outer) / CELL);
    const x1 = Math.floor((d.x + d.outer) / CELL);
    const y0 = Math.floor((d.y - d.outer) / CELL);
    const y1 = Math.floor((d.y + d.outer) / CELL);
    for (let ix = x0; ix <= x1; ix++)
      for (let iy = y0; iy <= y1; iy++) {
        const k = key(ix, iy);
        const l = grid.get(k);
        if (l) l.push(d);
        else grid.set(k, [d]);
      }
  };
  let index = 0;
  for (const f of pattern.families) {
    const ins = f.kind === 'threaded-insert';
    for (let row = 0; row < f.count.y; row++)
      for (let col = 0; col < f.count.x; col++, index++) {
        const nx = f.origin.x + col * f.pitch.x;
        const ny = f.origin.y + row * f.pitch.y;
        let X = cx0 + (1 + scaleX) * (nx - cx0) + yAxis[0] * (ny - cy0);
        let Y = cy0 + yAxis[1] * (ny - cy0);
        const pn = panels.find((p) => nx >= p.x && nx <= p.x + p.width && ny >= p.y && ny <= p.y + p.height);
        if (pn) {
          const a = (pn.rotationDeg * Math.PI) / 180;
          const pcx = pn.x + pn.width / 2;
          const pcy = pn.y + pn.height / 2;
          const dx = X - pcx;
          const dy = Y - pcy;
          X = pcx + Math.cos(a) * dx - Math.sin(a) * dy + pn.dx;
          Y = pcy + Math.sin(a) * dx + Math.cos(a) * dy + pn.dy;
        }
        const mp = misplacedSet.get(index);
        if (mp) {
          X += mp[0];
          Y += mp[1];
          misplaced.push({ family: f.id, col, row, dx: mp[0], dy: mp[1] });
        }
        const r = f.holeDiameter / 2;
        const outer = ins ? r * 1.75 : r;
        const px = projectBed(cam, X, Y) ?? [-1, -1];
        let hiddenBy: TruthHole['hiddenBy'];
        const edgePx = (outer * 1.5) / mmPerPx + 2;
        if (px[0] < edgePx || px[1] < edgePx || px[0] > opts.width - edgePx || px[1] > opts.height - edgePx) hiddenBy = 'outside';
        // hidden when any part of its outer disc lies under the paper or in a channel
        for (let k = 0; k < 8 && !hiddenBy; k++) {
          const a = (k * Math.PI) / 4;
          const qx = X + outer * 1.05 * Math.cos(a);
          const qy = Y + outer * 1.05 * Math.sin(a);
          if (underPaper(qx, qy) || underPaper(X, Y)) hiddenBy = 'target';
          else if (underOccluder(qx, qy) || underOccluder(X, Y)) hiddenBy = 'occluder';
          else if (inChannel(qx, qy) >= 0) hiddenBy = 'channel';
        }
        holes.push({ family: f.id, kind: f.kind, col, row, nominal: { x: nx, y: ny }, bed: { x: X, y: Y }, px, diameterMm: f.holeDiameter, visible: !hiddenBy, ...(hiddenBy ? { hiddenBy } : {}) });
        addDisc({ x: X, y: Y, r, kind: ins ? 'insert' : 'dog', outer, angle: rng() * Math.PI, tone: rng() });
      }
  }

  // screws and dust, kept off the holes so that the truth of a hole is its own edge
  const areaM2 = (bw * bh) / 1e6;
  const nearHole = (X: number, Y: number, clear: number): boolean => {
    const l = grid.get(key(Math.floor(X / CELL), Math.floor(Y / CELL)));
    if (!l) return false;
    return l.some((d) => Math.hypot(d.x - X, d.y - Y) < d.outer + clear);
  };
  const nScrews = Math.round(opts.screwsPerM2 * areaM2);
  for (let i = 0; i < nScrews; i++) {
    const X = uniform(rng, 10, bw - 10);
    const Y = uniform(rng, 10, bh - 10);
    if (nearHole(X, Y, 8)) continue;
    addDisc({ x: X, y: Y, r: 4.5, outer: 4.6, kind: 'screw', angle: rng() * Math.PI, tone: rng() });
  }
  const nDust = Math.round(opts.dustPerM2 * areaM2);
  for (let i = 0; i < nDust; i++) {
    const X = uniform(rng, 0, bw);
    const Y = uniform(rng, 0, bh);
    const r = 0.1 + 0.9 * rng() ** 3;
    if (nearHole(X, Y, r + 1.5)) continue;
    addDisc({ x: X, y: Y, r, outer: r * 1.4, kind: rng() < 0.6 ? 'dust-light' : 'dust-dark', angle: rng() * Math.PI, tone: rng() });
  }

  // --- shading ------------------------------------------------------------------------------------------
  const base = opts.material === 'mdf' ? [0.5, 0.36, 0.24] : [0.62, 0.5, 0.34];
  const panelTone = new Map<number, number>();
  const seamAt = (X: number, Y: number): boolean => {
    for (const p of panels) {
      const g = 0.25;
      const onX = Y >= p.y && Y <= p.y + p.height && (Math.abs(X - p.x) < g || Math.abs(X - p.x - p.width) < g);
      const onY = X >= p.x && X <= p.x + p.width && (Math.abs(Y - p.y) < g || Math.abs(Y - p.y - p.height) < g);
      if (onX || onY) return true;
    }
    return false;
  };
  const salt = opts.seed & 0xffff;
  const lightAngle = rng() * 2 * Math.PI;
  const wood = (X: number, Y: number, out: Float64Array) => {
    const drift = 0.85 + 0.3 * valueNoise(X / 250, Y / 250, salt);
    let fib: number;
    if (opts.material === 'mdf') fib = 0.94 + 0.08 * valueNoise(X / 1.2, Y / 1.2, salt + 1) + 0.04 * valueNoise(X / 6, Y / 0.5, salt + 2);
    else {
      const g = Math.sin((Y + 14 * valueNoise(X / 90, Y / 40, salt + 3)) * 0.9);
      fib = 0.93 + 0.06 * g * g + 0.05 * valueNoise(X / 8, Y / 0.4, salt + 4);
    }
    let pt = 1;
    for (let i = 0; i < panels.length; i++) {
      const p = panels[i]!;
      if (X >= p.x && X <= p.x + p.width && Y >= p.y && Y <= p.y + p.height) {
        let t = panelTone.get(i);
        if (t === undefined) {
          t = 0.94 + 0.12 * ((Math.sin(i * 12.9898) * 43758.5453) % 1 + 1) / 2;
          panelTone.set(i, t);
        }
        pt = t;
        break;
      }
    }
    const k = drift * fib * pt;
    out[0] = base[0]! * k;
    out[1] = base[1]! * k;
    out[2] = base[2]! * k;
  };
  const set = (out: Float64Array, r: number, g: number, b: number) => {
    out[0] = r;
    out[1] = g;
    out[2] = b;
  };
  const shade = (X: number, Y: number, out: Float64Array): void => {
    const oc = occluders.length ? occluderAt(X, Y) : undefined;
    if (oc) {
      const t = oc.tone ?? 0.06;
      set(out, t, t, t * 1.05);
      return;
    }
    const tp = underPaper(X, Y);
    if (tp) {
      const ink = opts.targetStyle === 'plain' ? tp[0] >= 0 && tp[1] >= 0 && tp[0] <= S && tp[1] <= S : targetInkAt(tp[0], tp[1], S);
      if (ink) set(out, 0.035, 0.035, 0.04);
      else {
        const p = 0.82 + 0.02 * valueNoise(X / 3, Y / 3, salt + 9);
        set(out, p, p, p * 0.98);
      }
      return;
    }
    const ch = inChannel(X, Y);
    if (ch >= 0) {
      const c = channels[ch]!;
      const along = c.width >= c.height;
      const w = along ? c.height : c.width;
      const off = along ? Y - (c.y + c.height / 2) : X - (c.x + c.width / 2);
      const slotHalf = 0.22 * w;
      if (Math.abs(off) < slotHalf) set(out, 0.04, 0.04, 0.045);
      else if (Math.abs(off) > w / 2 - 0.6) set(out, 0.25, 0.25, 0.26);
      else {
        const a = 0.55 + 0.03 * valueNoise(along ? X / 20 : X / 0.3, along ? Y / 0.3 : Y / 20, salt + 5);
        set(out, a, a, a * 1.02);
      }
      return;
    }
    const l = grid.get(key(Math.floor(X / CELL), Math.floor(Y / CELL)));
    if (l) {
      for (const d of l) {
        const dx = X - d.x;
        const dy = Y - d.y;
        const rho = Math.hypot(dx, dy);
        if (rho > d.outer) continue;
        switch (d.kind) {
          case 'insert': {
            if (rho <= d.r) {
              const thread = 0.05 + 0.012 * Math.cos((rho / 1.25) * 2 * Math.PI);
              set(out, thread, thread * 0.97, thread * 0.95);
            } else {
              const brass = d.tone < 0.5;
              const m = 0.62 + 0.06 * Math.cos((rho - d.r) * 3 + d.angle);
              if (brass) set(out, m * 1.05, m * 0.85, m * 0.5);
              else set(out, m, m, m * 1.03);
            }
            return;
          }
          case 'dog': {
            const q = rho / d.r;
            const th = Math.atan2(dy, dx);
            const v = 0.035 + 0.05 * q * q * (0.6 + 0.4 * Math.cos(th - lightAngle));
            set(out, v, v * 0.95, v * 0.9);
            return;
          }
          case 'screw': {
            const ang = Math.atan2(dy, dx) - d.angle;
            const along = Math.abs(rho * Math.cos(ang));
            const across = Math.abs(rho * Math.sin(ang));
            const cross = (along < 2.4 && across < 0.5) || (across < 2.4 && along < 0.5);
            if (cross) set(out, 0.08, 0.08, 0.085);
            else if (rho > d.r - 0.3) set(out, 0.3, 0.3, 0.3);
            else {
              const m = 0.5 + 0.05 * Math.cos(rho * 2);
              set(out, m, m, m * 1.02);
            }
            return;
          }
          default: {
            // irregular speck: radius modulated with angle
            const th = Math.atan2(dy, dx);
            const rr = d.r * (1 + 0.35 * Math.sin(3 * th + d.angle * 5) * (d.tone - 0.5) * 2);
            if (rho > rr) continue;
            if (d.kind === 'dust-light') set(out, 0.78, 0.7, 0.58);
            else set(out, 0.16, 0.13, 0.1);
            return;
          }
        }
      }
    }
    if (seamAt(X, Y)) {
      set(out, 0.1, 0.08, 0.06);
      return;
    }
    wood(X, Y, out);
  };

  return {
    options: opts,
    pattern,
    camera: cam,
    holes,
    target: { sizeMm: S, centreMm: [tcx, tcy], rotationRad: rot, cornersBed, cornersPx, sheetMm: [2 * paperHalfW, 2 * paperHalfH] },
    errors: { scaleX, scaleY, squarenessDeg, panels: panels.map((p) => ({ id: p.id, dx: p.dx, dy: p.dy, rotationDeg: p.rotationDeg })), misplaced },
    mmPerPx,
    shade,
  };
}

/** Sensor noise helper re-exported for the renderer. */
export { gauss };
export type { Rng };
