/**
 * analyzePoints: detected hole centres (image px, origin top-left, +y down) and a reference square → the report
 * (bed frame mm, origin front-left, +X right, +Y away from the operator). Steps: correspondence
 * (correspond.ts), joint lens + bed fit (bedfit.ts), shape from the square (shape.ts), positions placed on the
 * bed by the best rigid fit, verdicts (verdict.ts), panels and seams.
 */
import { MeasuredDistancesSchema, PatternSchema, PointsSchema, type MeasuredDistance, type Pattern, type Points, type Report } from './contract';
import { applyDistances } from './distances';
import { decomposeAffine, type Mat2 } from './affine';
import { fitBed, predictPx, toLattice, type BedModel } from './bedfit';
import { defaultFocalPx, focalFromHomography, type Lens } from './camera';
import { assign, confusableOffsets, familiesForDiameter, initialImageToBed, type Detections } from './correspond';
import { GeometryInputError } from './errors';
import { homographyDlt, homographyJacobian, type Pt } from './homography';
import { buildLattice, nearestNode, neighbourPanels, type Lattice } from './lattice';
import { applyH, mat3Inv, mat3Mul, type Mat3 } from './linalg';
import { huberWeight, madSigma, median, ransac } from './robust';
import { globalSigma, latticeShape, shapeDisplacementVar, squarePrecision, type ShapeEstimate } from './shape';
import { insideQuad, orderSquareCorners, squareHomography } from './square';
import { rigid2 } from './umeyama';
import { bedVerdict, positionVerdict, panelCorrection } from './verdict';
import { formFit, positionForm, shapeCheck } from './form';
import { patternToMm } from './units';

export interface AnalyzeOptions {
  /**
   * 1σ precision of the reference square's corners, px. Overrides `points.reference.cornerSigmaPx`; without either,
   * 0.1 px raised to the square's own residual (shape.ts).
   */
  cornerSigmaPx?: number;
  /** Relative diameter mismatch (e.g. 0.35 = ±35 %) within which a detection may belong to a family. */
  diameterTolerance?: number;
  /** Thickness of the reference sheet, mm: its top face sits this far above the bed (default 0). */
  referenceThicknessMm?: number;
  /**
   * 1σ precision of a detected hole centre, px, if the detector knows it. Without it the fit's residual scatter is
   * used, which also holds the holes' own scatter and so errs on the cautious side.
   */
  centreSigmaPx?: number;
  /**
   * Distances measured between two positions (labels as the report writes them), combined with the reference
   * square's estimate of scale and squareness (distances.ts).
   */
  distances?: readonly MeasuredDistance[];
  /** Fit Brown–Conrady k1, k2 (default true). */
  fitDistortion?: boolean;
  /** Least-accurate shape terms still reported as observed: 1σ of scale (default 0.003) and squareness (° , 0.2). */
  maxScaleSigma?: number;
  maxSquarenessSigmaDeg?: number;
}

const DEG = 180 / Math.PI;
const MIN_MATCHED = 8;

function parseOrThrow<T>(schema: { safeParse(x: unknown): { success: true; data: T } | { success: false; error: { issues: { path: PropertyKey[]; message: string }[] } } }, x: unknown, root: string): T {
  const r = schema.safeParse(x);
  if (r.success) return r.data;
  const issue = r.error.issues[0]!;
  const field = [root, ...issue.path.map(String)].join('.');
  throw new GeometryInputError(field, issue.message);
}

/**
 * Measures a bed from one photo's detections.
 * @param points detections and reference square, image px
 * @param pattern the bed's nominal pattern (mm or in)
 * @returns the report, bed frame mm; throws GeometryInputError naming the field on bad input
 */
export function analyzePoints(points: Points, pattern: Pattern, options: AnalyzeOptions = {}): Report {
  const pts = parseOrThrow<Points>(PointsSchema, points, 'points');
  const pat = parseOrThrow<Pattern>(PatternSchema, pattern, 'pattern');
  const pm = patternToMm(pat);
  let lat: Lattice;
  try { lat = buildLattice(pm); } catch (e) { throw new GeometryInputError('pattern.families', (e as Error).message); }
  const dTol = options.diameterTolerance ?? 0.35;
  const { width: W, height: Hh } = pts.image;
  const corners = orderSquareCorners(pts.reference.corners as unknown as Pt[]);
  const sqH = squareHomography(corners, pts.reference.sizeMm);
  const sqInv = mat3Inv(sqH);

  const n = pts.holes.length;
  const det: Detections = {
    n, u: Float64Array.from(pts.holes, (h) => h.x), v: Float64Array.from(pts.holes, (h) => h.y),
    dPx: Float64Array.from(pts.holes, (h) => h.diameterPx), conf: Float64Array.from(pts.holes, (h) => h.confidence ?? 1),
  };
  // Detections on the reference sheet are not holes of the bed.
  const sidePx = Math.sqrt(Math.abs((corners[2][0] - corners[0][0]) * (corners[3][1] - corners[1][1]) - (corners[3][0] - corners[1][0]) * (corners[2][1] - corners[0][1])) / 2);
  const usable = new Uint8Array(n);
  for (let i = 0; i < n; i++) usable[i] = insideQuad(corners, det.u[i]!, det.v[i]!, 0.02 * sidePx) ? 0 : 1;

  // A detector may size holes consistently large or small (an insert's rim, a chamfer): `kappa` is the ratio of
  // detected to nominal diameter, found from the first matches when too few detections fit the nominal sizes.
  let kappa = 1;
  const famOfWith = (imageToBedScale: (i: number) => number, tol: number) => {
    const out: number[][] = [];
    for (let i = 0; i < n; i++) out.push(usable[i] ? familiesForDiameter(lat, (det.dPx[i]! * imageToBedScale(i)) / kappa, tol) : []);
    return out;
  };
  const localScale = (h: Mat3, i: number) => { const j = homographyJacobian(h, det.u[i]!, det.v[i]!); return Math.sqrt(Math.abs(j[0] * j[3] - j[1] * j[2])); };
  let famOf = famOfWith((i) => localScale(sqInv, i), dTol);
  const nUsable = usable.reduce((a, b) => a + b, 0);
  const sizedWide = famOf.filter((f) => f.length).length < 0.3 * nUsable;
  if (sizedWide) famOf = famOfWith((i) => localScale(sqInv, i), 1.0);

  const init = initialImageToBed(lat, det, usable, famOf, sqInv, sqH);
  if (!init) throw new GeometryInputError('holes', `fewer than ${MIN_MATCHED} holes could be matched to the pattern (no lattice found)`);
  const minPitch = (fi: number) => Math.min(lat.families[fi]!.family.pitch.x, lat.families[fi]!.family.pitch.y);
  const bedXY = new Float64Array(2 * n);
  const mapAll = (f: (u: number, v: number) => [number, number]) => { for (let i = 0; i < n; i++) { const [x, y] = f(det.u[i]!, det.v[i]!); bedXY[2 * i] = x; bedXY[2 * i + 1] = y; } };

  const Hib0 = init.H;
  mapAll((u, v) => applyH(Hib0, u, v));
  let asg = assign(lat, bedXY, n, usable, famOf, (f) => 0.3 * minPitch(f));
  const pairs = (a: typeof asg) => { const src: Pt[] = [], dst: Pt[] = [], idx: number[] = []; for (let i = 0; i < n; i++) { const p = a.posOf[i]!; if (p >= 0) { src.push([lat.positions[p]!.x, lat.positions[p]!.y]); dst.push([det.u[i]!, det.v[i]!]); idx.push(i); } } return { src, dst, idx }; };
  let pr = pairs(asg);
  if (pr.src.length < MIN_MATCHED) throw new GeometryInputError('holes', `only ${pr.src.length} holes matched the pattern; at least ${MIN_MATCHED} are needed`);
  if (sizedWide) {
    const ratios = pr.idx.map((i) => (det.dPx[i]! * localScale(sqInv, i)) / lat.families[lat.positions[asg.posOf[i]!]!.family]!.family.holeDiameter);
    kappa = median(ratios);
  }
  // Robust homography bed → image: RANSAC on the first pairs (a wrong phase in part of the photo cannot pull
  // it), then Huber IRLS, then reassign.
  const pxPerMm = 1 / Math.max(1e-9, median(pr.idx.map((i) => localScale(sqInv, i))));
  const gatePx = 0.15 * Math.min(...lat.families.map((_, f) => minPitch(f))) * pxPerMm;
  // Consensus on an even subsample of at most 300 pairs, then the inliers among all pairs.
  const sub = pr.src.map((_, k) => k).filter((k) => k % Math.max(1, Math.ceil(pr.src.length / 300)) === 0);
  const resid = (h: Mat3, k: number) => { const p = applyH(h, pr.src[k]![0], pr.src[k]![1]); return Math.hypot(p[0] - pr.dst[k]![0], p[1] - pr.dst[k]![1]); };
  const consensus = ransac(sub.length, 4, (ix) => { try { return homographyDlt(ix.map((k) => pr.src[sub[k]!]!), ix.map((k) => pr.dst[sub[k]!]!)); } catch { return null; } },
    (h, k) => resid(h, sub[k]!), gatePx, { iterations: 40, seed: 1 });
  const inl = consensus ? pr.src.map((_, k) => k).filter((k) => resid(consensus.model, k) < gatePx) : [];
  let H1 = inl.length >= MIN_MATCHED ? homographyDlt(inl.map((k) => pr.src[k]!), inl.map((k) => pr.dst[k]!)) : homographyDlt(pr.src, pr.dst);
  for (let it = 0; it < 2; it++) {
    const r = pr.src.map((s, k) => { const p = applyH(H1, s[0], s[1]); return Math.hypot(p[0] - pr.dst[k]![0], p[1] - pr.dst[k]![1]); });
    const sg = Math.max(madSigma(r), 0.05);
    H1 = homographyDlt(pr.src, pr.dst, r.map((x) => huberWeight(x, 2 * sg)));
    const inv = mat3Inv(H1);
    mapAll((u, v) => applyH(inv, u, v));
    famOf = famOfWith((i) => localScale(inv, i), dTol);
    asg = assign(lat, bedXY, n, usable, famOf, (f) => 0.25 * minPitch(f));
    pr = pairs(asg);
    if (pr.src.length < MIN_MATCHED) throw new GeometryInputError('holes', `only ${pr.src.length} holes matched the pattern; at least ${MIN_MATCHED} are needed`);
  }

  // Whole-pitch placement, judged again through the refined map. The first choice was made in the square's own
  // frame, which strong perspective stretches far from a small square, so it can be off by a pitch: the matched
  // holes then fit a lattice one pitch over and the holes along one edge go unmatched. Through H1 (perspective
  // included) every detection lands near a node of a placement; a shift by whole pitches of a family that matches
  // more detections wins (ties keep the current placement, so a partial view keeps its centring).
  {
    const pitches = (axis: 'x' | 'y') => [...new Set(lat.families.map((f) => f.family.pitch[axis]))];
    const inv = mat3Inv(H1);
    mapAll((u, v) => applyH(inv, u, v));
    const base = Float64Array.from(bedXY);
    // Cheap score on an even sample of at most 300 detections: how many land within the gate of a node of a
    // family their size fits; the full assignment is redone only when a shift scores higher.
    const step = Math.max(1, Math.ceil(n / 300));
    const score = (sx: number, sy: number) => {
      let c = 0;
      for (let i = 0; i < n; i += step) {
        if (!usable[i]) continue;
        for (const f of famOf[i]!) if (nearestNode(lat, f, base[2 * i]! + sx, base[2 * i + 1]! + sy).dist < 0.25 * minPitch(f)) { c++; break; }
      }
      return c;
    };
    let best = { c: score(0, 0), sx: 0, sy: 0 };
    // Offsets between families' origins too: families of one size interleaved (a staggered grid) can be taken
    // one for the other.
    const offs: [number, number][] = [];
    lat.families.forEach((_, fi) => { for (const o of confusableOffsets(lat, fi)) if (!offs.some((q) => q[0] === o[0] && q[1] === o[1])) offs.push(o); });
    for (const [ox, oy] of offs) for (const px of pitches('x')) for (const py of pitches('y'))
      for (let kx = -2; kx <= 2; kx++) for (let ky = -2; ky <= 2; ky++) {
        const sx = ox + kx * px, sy = oy + ky * py;
        if (!sx && !sy) continue;
        const c = score(sx, sy);
        if (c > best.c) best = { c, sx, sy };
      }
    if (best.sx || best.sy) {
      for (let i = 0; i < n; i++) { bedXY[2 * i] = base[2 * i]! + best.sx; bedXY[2 * i + 1] = base[2 * i + 1]! + best.sy; }
      const a2 = assign(lat, bedXY, n, usable, famOf, (f) => 0.25 * minPitch(f));
      if (pairs(a2).src.length > pr.src.length) { asg = a2; pr = pairs(asg); H1 = homographyDlt(pr.src, pr.dst); }
    }
  }

  const f0 = pts.image.focalPx ?? defaultFocalPx(W, Hh);
  const lens0: Lens = { fPx: f0, cx: W / 2, cy: Hh / 2, k1: 0, k2: 0 };
  const runFit = (a: typeof asg, warm?: BedModel) => {
    const p = pairs(a);
    const nominal = new Float64Array(2 * p.idx.length), observed = new Float64Array(2 * p.idx.length), panel = new Int32Array(p.idx.length), w = new Float64Array(p.idx.length);
    p.idx.forEach((i, k) => { const pos = lat.positions[a.posOf[i]!]!; nominal[2 * k] = pos.x; nominal[2 * k + 1] = pos.y; observed[2 * k] = det.u[i]!; observed[2 * k + 1] = det.v[i]!; panel[k] = pos.panel; w[k] = det.conf[i]!; });
    return { model: fitBed({ nominal, observed, panel, n: p.idx.length, panels: lat.panels, lens: lens0, H0: H1, fitDistortion: options.fitDistortion, weights: w, warm }), idx: p.idx };
  };
  let fit = runFit(asg);
  const refOf = (m: BedModel) => (pos: number): [number, number] => {
    const q = lat.positions[pos]!, P = lat.panels[q.panel]!;
    const c = Math.cos(m.panelRot[q.panel]!), s = Math.sin(m.panelRot[q.panel]!);
    const ax = q.x - P.cx, ay = q.y - P.cy;
    return [P.cx + c * ax - s * ay + m.panelDx[q.panel]!, P.cy + s * ax + c * ay + m.panelDy[q.panel]!];
  };
  // Tight gate for the fit: a hole's own residual, beyond its panel's move.
  const tightGate = (fi: number) => {
    const f = lat.families[fi]!;
    return Math.min(0.3 * minPitch(fi), Math.max(1.0, 0.15 * f.family.holeDiameter, 4 * f.toleranceMm));
  };
  for (let round = 0; round < 3; round++) {
    const m = fit.model;
    mapAll((u, v) => toLattice(m, u, v));
    famOf = famOfWith((i) => localScaleModel(m, det.u[i]!, det.v[i]!), dTol);
    const prev = asg.posOf;
    asg = assign(lat, bedXY, n, usable, famOf, tightGate, refOf(m));
    const k = pairs(asg).idx.length;
    if (k < MIN_MATCHED) throw new GeometryInputError('holes', `only ${k} holes matched the pattern; at least ${MIN_MATCHED} are needed`);
    // Stop once the assignment no longer changes (the first round always refits with the tight gate).
    if (round > 0 && asg.posOf.every((p, i) => p === prev[i])) break;
    fit = runFit(asg, m);
  }
  const model = fit.model;
  const inFit = new Uint8Array(n);
  for (const i of fit.idx) inFit[i] = 1;
  // Wide gate for reporting holes too far off to be trusted in the fit: tight diameter match, free node only.
  mapAll((u, v) => toLattice(model, u, v));
  const sLoc = (i: number) => localScaleModel(model, det.u[i]!, det.v[i]!);
  const famTight = famOfWith(sLoc, 0.15);
  const free = new Uint8Array(n);
  for (let i = 0; i < n; i++) free[i] = usable[i] && asg.posOf[i]! < 0 ? 1 : 0;
  const wide = assign(lat, bedXY, n, free, famTight, (f) => Math.min(0.3 * minPitch(f), 5), refOf(model));
  for (let i = 0; i < n; i++) { const p = wide.posOf[i]!; if (p >= 0 && asg.detOf[p]! < 0) { asg.posOf[i] = p; asg.detOf[p] = i; } }

  // Shape from the square; the focal length (EXIF, else from the metric homography when the view is oblique
  // enough, else assumed) is needed only to correct for a thick reference sheet and to report the camera.
  const precision = squarePrecision(pts.reference, corners, options.cornerSigmaPx);
  let shape: ShapeEstimate = latticeShape(model, corners, pts.reference.sizeMm, precision);
  const metricH = mat3Mul(model.H, affineToMat3(invert2x2(shape.L)));
  const fEst = pts.image.focalPx ? null : focalFromHomography(metricH, W / 2, Hh / 2);
  const fOut = pts.image.focalPx ?? (fEst && fEst > 0.2 * Math.hypot(W, Hh) && fEst < 5 * Math.hypot(W, Hh) ? fEst : f0);
  const tMm = options.referenceThicknessMm ?? 0;
  if (tMm > 0) {
    // The sheet's top face is tMm nearer the camera than the bed, so it looks larger by D / (D − t).
    const distMm = fOut * (pts.reference.sizeMm / sidePx);
    shape = latticeShape(model, corners, (pts.reference.sizeMm * distMm) / Math.max(distMm - tMm, 1e-6), precision);
  }
  // Measured distances between positions, combined with the square as weighted information (distances.ts).
  let distanceRows: Report['distances'];
  if (options.distances?.length) {
    const given = parseOrThrow(MeasuredDistancesSchema, options.distances, 'distances');
    const centreSigma = Math.max(options.centreSigmaPx ?? model.sigmaPx, 1e-4);
    const r = applyDistances(shape, given, lat, (pos) => {
      const d = asg.detOf[pos]!;
      return d < 0 ? null : { xyMm: toLattice(model, det.u[d]!, det.v[d]!), sigmaMm: centreSigma * localScaleModel(model, det.u[d]!, det.v[d]!) };
    });
    shape = r.shape;
    distanceRows = r.rows;
  }
  const maxSS = options.maxScaleSigma ?? 0.003, maxSq = (options.maxSquarenessSigmaDeg ?? 0.2) / DEG;
  const sig = shape.sigma;
  let observed = Number.isFinite(sig.scaleX) && Number.isFinite(sig.scaleY) && Number.isFinite(sig.squarenessRad) && sig.scaleX <= maxSS && sig.scaleY <= maxSS && sig.squarenessRad <= maxSq;
  let reason: string | undefined;
  if (!observed) reason = `the reference square (${shape.squareSidePx.toFixed(0)} px across) cannot separate the lattice's scale and squareness from the camera's perspective to better than ${(Math.max(sig.scaleX, sig.scaleY) * 1e6).toFixed(0)} ppm and ${(sig.squarenessRad * DEG).toFixed(3)}°; a larger square or a straighter view is needed`;
  if (observed && (Math.abs(shape.terms.scaleX - 1) > 0.05 || Math.abs(shape.terms.scaleY - 1) > 0.05 || Math.abs(shape.terms.squarenessRad) > 2 / DEG)) {
    observed = false;
    reason = `the lattice and the reference square disagree by more than 5 % in scale or 2° in squareness; check the square's size and corners`;
  }
  const L: Mat2 = observed ? shape.L : [1, 0, 0, 1];
  // Rotation gauge of L is the square's turn on the bed; remove it so L is shape only (Lᵀ-polar: keep X axis fixed).
  const tL = decomposeAffine(L);
  const cr = Math.cos(-tL.rotationRad), sr = Math.sin(-tL.rotationRad);
  const Ls: Mat2 = [cr * L[0] - sr * L[2], cr * L[1] - sr * L[3], sr * L[0] + cr * L[2], sr * L[1] + cr * L[3]];

  // Positions: true position (metric) placed onto the bed by the best rigid fit.
  const P = lat.positions.length;
  const mXY = new Float64Array(2 * P).fill(NaN);
  const fitX: number[] = [], fitY: number[] = [], fitW: number[] = [];
  for (let i = 0; i < n; i++) {
    const pos = asg.posOf[i]!;
    if (pos < 0) continue;
    const [x, y] = toLattice(model, det.u[i]!, det.v[i]!);
    mXY[2 * pos] = Ls[0] * x + Ls[1] * y; mXY[2 * pos + 1] = Ls[2] * x + Ls[3] * y;
    if (inFit[i]) { const q = lat.positions[pos]!; fitX.push(q.x, q.y); fitY.push(mXY[2 * pos]!, mXY[2 * pos + 1]!); fitW.push(1); }
  }
  const rg = rigid2(fitX, fitY, fitW.length);
  const rc = Math.cos(rg.angleRad), rs = Math.sin(rg.angleRad);
  let cxm = 0, cym = 0;
  for (let k = 0; k < fitW.length; k++) { cxm += fitX[2 * k]!; cym += fitX[2 * k + 1]!; }
  cxm /= Math.max(1, fitW.length); cym /= Math.max(1, fitW.length);
  const sigmaPx = Math.max(options.centreSigmaPx ?? model.sigmaPx, 1e-4);
  const hidden = new Uint8Array(P), notExpected = new Uint8Array(P);
  const positions: Report['positions'] = lat.positions.map((q, pos) => {
    const fam = lat.families[q.family]!;
    const panel = lat.panels[q.panel]!.implicit ? null : lat.panels[q.panel]!.id;
    const base = { family: fam.id, col: q.col, row: q.row, label: q.label, panel, nominal: { x: q.x, y: q.y }, toleranceMm: fam.toleranceMm };
    const d = asg.detOf[pos]!;
    if (d < 0) {
      const [pu, pv] = predictPx(model, q.x, q.y, q.panel, lat.panels);
      const hid = insideQuad(corners, pu, pv, 0.02 * sidePx);
      const away = !(pu >= 0 && pv >= 0 && pu < W && pv < Hh);
      hidden[pos] = hid ? 1 : 0;
      notExpected[pos] = hid || away ? 1 : 0;
      return { ...base, measured: null, deviation: null, uncertaintyMm: null, verdict: 'missing' as const, ...(hid ? { hidden: true } : {}), ...(away ? { outOfView: true } : {}) };
    }
    const mx = mXY[2 * pos]! - rg.tx, my = mXY[2 * pos + 1]! - rg.ty;
    const x = rc * mx + rs * my, y = -rs * mx + rc * my;
    const dx = x - q.x, dy = y - q.y, r = Math.hypot(dx, dy);
    const s = localScaleModel(model, det.u[d]!, det.v[d]!);
    const ex = q.x - cxm, ey = q.y - cym;
    const shapeVar = observed ? shapeDisplacementVar(shape.cov, ex, ey) : 0;
    const u = Math.sqrt((sigmaPx * s) ** 2 + shapeVar);
    return { ...base, measured: { x, y }, deviation: { dx, dy, r }, uncertaintyMm: u, verdict: positionVerdict(r, u, fam.toleranceMm) };
  });

  // Hole to hole (form.ts): lattice-frame positions, before the square's shape, after the best robust affine.
  const formAt = positions.flatMap((p, pos) => (p.measured ? [pos] : []));
  const detAt = (pos: number) => asg.detOf[pos]!;
  const form = formFit(formAt.flatMap((pos) => [lat.positions[pos]!.x, lat.positions[pos]!.y]), formAt.flatMap((pos) => toLattice(model, det.u[detAt(pos)]!, det.v[detAt(pos)]!)),
    formAt.map((pos) => sigmaPx * localScaleModel(model, det.u[detAt(pos)]!, det.v[detAt(pos)]!)), formAt.map((pos) => inFit[detAt(pos)]!));
  formAt.forEach((pos, k) => { positions[pos]!.form = positionForm(form, k, positions[pos]!.toleranceMm); });
  // Overall size and squareness: the square's shape with the stretch or shear the panels' offsets make together.
  const Lf = form.affine.L, Lt: Mat2 = [Ls[0] * Lf[0] + Ls[1] * Lf[2], Ls[0] * Lf[1] + Ls[1] * Lf[3], Ls[2] * Lf[0] + Ls[3] * Lf[2], Ls[2] * Lf[1] + Ls[3] * Lf[3]];
  const shapeOk = shapeCheck(lat.positions.flatMap((q) => [q.x, q.y]), P, observed ? decomposeAffine(Lt) : null, observed ? sig : null, Math.min(...lat.families.map((f) => f.toleranceMm)));

  // Panels.
  const cov = model.cov, np = model.np;
  const covAt = (a: number, b: number) => cov[a * np + b]!;
  const panels: Report['panels'] = lat.panels.map((q, j) => {
    const b = model.panelParam[j]!;
    const count = positions.filter((p, k) => lat.positions[k]!.panel === j && p.measured).length;
    if (lat.panels.length === 1) return { id: q.id, dx: 0, dy: 0, rotationDeg: 0, positions: count, uncertaintyMm: 0, correction: 'no correction: a single panel is the reference for itself' };
    if (b < 0) return { id: q.id, dx: 0, dy: 0, rotationDeg: 0, positions: count, uncertaintyMm: Math.hypot(q.width, q.height), correction: 'not enough holes seen on this panel to place it' };
    const dx = model.panelDx[j]!, dy = model.panelDy[j]!, rot = model.panelRot[j]!;
    const u = Math.sqrt(Math.max(0, (covAt(b, b) + covAt(b + 1, b + 1)) / 2));
    return { id: q.id, dx, dy, rotationDeg: rot * DEG, positions: count, uncertaintyMm: u, rotationUncertaintyDeg: Math.sqrt(Math.max(0, covAt(b + 2, b + 2))) * DEG, correction: panelCorrection(dx, dy, rot * DEG) };
  });
  const seams: Report['seams'] = [];
  for (const nb of neighbourPanels(lat.panels)) {
    const ba = model.panelParam[nb.a]!, bb = model.panelParam[nb.b]!;
    if (ba < 0 || bb < 0) continue;
    const A = lat.panels[nb.a]!, B = lat.panels[nb.b]!;
    // Displacement of panel j at the seam point: (dx − ρ·Δy, dy + ρ·Δx), linear in (dx, dy, ρ).
    const disp = (j: number, c: { cx: number; cy: number }) => ({
      gx: [1, 0, -(nb.y - c.cy)], gy: [0, 1, nb.x - c.cx],
      x: model.panelDx[j]! - model.panelRot[j]! * (nb.y - c.cy), y: model.panelDy[j]! + model.panelRot[j]! * (nb.x - c.cx),
    });
    const da = disp(nb.a, A), db = disp(nb.b, B);
    const vr = (g: number[]) => { const idx = [ba, ba + 1, ba + 2, bb, bb + 1, bb + 2]; let s = 0; for (let i = 0; i < 6; i++) for (let k = 0; k < 6; k++) s += g[i]! * covAt(idx[i]!, idx[k]!) * g[k]!; return Math.max(0, s); };
    const sx = vr([...da.gx.map((v) => -v), ...db.gx]), sy = vr([...da.gy.map((v) => -v), ...db.gy]);
    const dx = db.x - da.x, dy = db.y - da.y;
    seams.push({ a: A.id, b: B.id, dx, dy, r: Math.hypot(dx, dy), uncertaintyMm: Math.sqrt((sx + sy) / 2) });
  }

  // Lattice terms: bed +X in the photo (counter-clockwise as seen) and the shape.
  const rotationOf = (h: Mat3) => {
    const c0 = applyH(h, pm.bed.width / 2, pm.bed.height / 2), c1 = applyH(h, pm.bed.width / 2 + 100, pm.bed.height / 2);
    return Math.atan2(-(c1[1] - c0[1]), c1[0] - c0[0]) * DEG;
  };
  const rotationDeg = rotationOf(model.H);
  const rotationSigmaDeg = globalSigma(model, (h) => rotationOf(h));
  const lattice: Report['lattice'] = {
    rotationDeg,
    scaleX: observed ? shape.terms.scaleX : null,
    scaleY: observed ? shape.terms.scaleY : null,
    squarenessDeg: observed ? shape.terms.squarenessRad * DEG : null,
    observed,
    ...(reason ? { reason } : {}),
    uncertainty: {
      rotationDeg: rotationSigmaDeg,
      scaleX: observed ? sig.scaleX : null, scaleY: observed ? sig.scaleY : null, squarenessDeg: observed ? sig.squarenessRad * DEG : null,
    },
    shapeCheck: shapeOk,
  };

  const rk = fOut / model.lens.fPx;
  // Camera tilt from straight down: the bed normal in the camera frame, r1 × r2 of K⁻¹ H (metric).
  const kc = (j: number) => [(metricH[j]! - (W / 2) * metricH[6 + j]!) / fOut, (metricH[3 + j]! - (Hh / 2) * metricH[6 + j]!) / fOut, metricH[6 + j]!];
  const r1 = kc(0), r2 = kc(1);
  const r3 = [r1[1]! * r2[2]! - r1[2]! * r2[1]!, r1[2]! * r2[0]! - r1[0]! * r2[2]!, r1[0]! * r2[1]! - r1[1]! * r2[0]!];
  const tiltDeg = Math.acos(Math.min(1, Math.abs(r3[2]!) / Math.hypot(r3[0]!, r3[1]!, r3[2]!))) * DEG;
  const sdK = (i: number) => Math.sqrt(Math.max(0, model.cov[i * model.np + i]!));
  const camera = { focalPx: fOut, k1: model.lens.k1 * rk * rk, k2: model.lens.k2 * rk ** 4, uncertainty: { k1: knownOrNull(sdK(8) * rk * rk), k2: knownOrNull(sdK(9) * rk ** 4) }, focalSource: pts.image.focalPx ? 'exif' as const : fOut === f0 ? 'assumed' as const : 'estimated' as const, tiltDeg, principalPoint: { x: W / 2, y: Hh / 2 } };

  const unmatched: Report['unmatched'] = [];
  for (let i = 0; i < n; i++) if (asg.posOf[i]! < 0) unmatched.push({ x: det.u[i]!, y: det.v[i]! });

  const warnings: string[] = [];
  if (init.tiedShifts > 1) warnings.push(`the photo does not show where the lattice starts (${init.tiedShifts} whole-pitch placements fit equally well); labels assume the holes seen are centred on the pattern`);
  if (reason) warnings.push(`lattice shape not observed: ${reason}`);
  for (const d of distanceRows ?? []) {
    if (!d.used) warnings.push(`the distance ${d.from} to ${d.to} was not used: ${d.note}`);
    else if (Math.abs(d.residualSigmas!) > 3) warnings.push(`the distance ${d.from} to ${d.to} (${d.mm} mm) disagrees with the photo by ${d.residualMm!.toFixed(2)} mm, ${Math.abs(d.residualSigmas!).toFixed(1)} times its uncertainty: check the measurement and the labels`);
  }
  const summary = bedVerdict(positions, panels, lat, notExpected, shapeOk);
  if (init.tiedShifts > 1) summary.sentence = summary.sentence.replace(/\.$/, '; labels are uncertain because the photo does not show where the lattice starts.');
  return {
    version: 1, units: 'mm', pattern: { name: pm.name }, positions, unmatched, panels, seams, lattice, camera, summary, warnings,
    ...(distanceRows ? { distances: distanceRows } : {}),
    diagnostics: { scaleSigmaParts: { corners: shape.parts.cornersScale, fit: shape.parts.fitScale }, diameterRatio: kappa, residualSigmaPx: model.sigmaPx, centreSigmaPx: sigmaPx, inFit: fit.idx.length, squareSidePx: shape.squareSidePx, cornerSigmaPx: shape.cornerSigmaPx, squareResidualPx: shape.squareResidualPx, hidden: hidden.reduce((a, b) => a + b, 0) },
  };
}

/** A 1σ the fit cannot state (its covariance not invertible, NaN) is unknown: null, as JSON would store it. */
const knownOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

function localScaleModel(m: BedModel, u: number, v: number): number {
  const j = homographyJacobian(m.Hinv, u, v);
  return Math.sqrt(Math.abs(j[0] * j[3] - j[1] * j[2]));
}
const invert2x2 = (L: Mat2): Mat2 => { const d = L[0] * L[3] - L[1] * L[2]; return [L[3] / d, -L[1] / d, -L[2] / d, L[0] / d]; };
const affineToMat3 = (L: Mat2): Mat3 => [L[0], L[1], 0, L[2], L[3], 0, 0, 0, 1];
