/**
 * An invented check report of a two-panel bed (inserts on a 100 mm lattice, a row of dog holes), built
 * position by position and parsed with the contract's ReportSchema, so it has every field a real report has.
 * Deviations: panel P2 shifted +0.12 / −0.05 mm, a small seeded scatter, one insert far off, a few near the
 * limit, two positions not seen. `scale` repeats the lattice to make a large report.
 */
import { ReportSchema, type Report, type ReportPosition } from '@/lib/geometry/contract';
import { panelCorrection } from '@/lib/geometry/verdict';

function lcg(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
}

const letters = (k: number) => (k < 26 ? String.fromCharCode(65 + k) : `${String.fromCharCode(65 + Math.floor(k / 26) - 1)}${String.fromCharCode(65 + (k % 26))}`);

export function buildReport(opts: { cols?: number; rows?: number; seed?: number } = {}): Report {
  const cols = opts.cols ?? 12;
  const rows = opts.rows ?? 5;
  const rand = lcg(opts.seed ?? 7);
  const bedW = 100 * cols + 20;
  const bedH = 100 * rows + 110;
  const panelSplit = 100 * Math.ceil(cols / 2) + 10;
  const positions: ReportPosition[] = [];
  const u = 0.02;
  const add = (family: string, col: number, row: number, x: number, y: number, tol: number, extra?: { dx: number; dy: number } | 'missing') => {
    const panel = x < panelSplit ? 'P1' : 'P2';
    const label = `${family} ${letters(col)}${row + 1}`;
    if (extra === 'missing') {
      positions.push({ family, col, row, label, panel, nominal: { x, y }, measured: null, deviation: null, uncertaintyMm: null, toleranceMm: tol, verdict: 'missing' });
      return;
    }
    const shift = panel === 'P2' ? { dx: 0.12, dy: -0.05 } : { dx: 0, dy: 0 };
    const dx = shift.dx + 0.03 * rand() + (extra?.dx ?? 0);
    const dy = shift.dy + 0.03 * rand() + (extra?.dy ?? 0);
    const r = Math.hypot(dx, dy);
    const verdict = r + 1.959964 * u <= tol ? 'in' : r - 1.959964 * u > tol ? 'out' : 'marginal';
    positions.push({ family, col, row, label, panel, nominal: { x, y }, measured: { x: x + dx, y: y + dy }, deviation: { dx, dy, r }, uncertaintyMm: u, toleranceMm: tol, verdict });
  };
  for (let j = 0; j < rows; j += 1) {
    for (let i = 0; i < cols; i += 1) {
      const x = 60 + 100 * i;
      const y = 60 + 100 * j;
      const extra = i === 3 && j === 2 ? { dx: 0.55, dy: 0.3 } : (i === 8 && j === 1) || (i === 1 && j === 4) ? { dx: 0.28, dy: 0.1 } : i === 10 && j === 0 ? 'missing' as const : undefined;
      add('insert', i, j, x, y, 0.4, extra);
    }
  }
  for (let i = 0; i < cols; i += 1) add('dog', i, 0, 60 + 100 * i, bedH - 40, 0.25, i === 5 ? 'missing' : undefined);

  const measured = positions.filter((p) => p.deviation);
  const rs = measured.map((p) => p.deviation!.r);
  const out = positions.filter((p) => p.verdict === 'out');
  const marginal = positions.filter((p) => p.verdict === 'marginal');
  const verdict = out.length ? 'fail' : marginal.length ? 'marginal' : 'pass';
  return ReportSchema.parse({
    version: 1,
    units: 'mm',
    pattern: {
      name: 'Two-panel test bed', version: 1, units: 'mm', bed: { width: bedW, height: bedH },
      panels: [
        { id: 'P1', x: 0, y: 0, width: panelSplit, height: bedH },
        { id: 'P2', x: panelSplit, y: 0, width: bedW - panelSplit, height: bedH },
      ],
    },
    positions,
    unmatched: [{ x: 333.3, y: 150.2 }],
    panels: [
      { id: 'P1', dx: 0.004, dy: -0.002, rotationDeg: 0.0004, positions: measured.filter((p) => p.panel === 'P1').length, uncertaintyMm: 0.006, correction: panelCorrection(0.004, -0.002, 0.0004) },
      { id: 'P2', dx: 0.121, dy: -0.049, rotationDeg: 0.003, positions: measured.filter((p) => p.panel === 'P2').length, uncertaintyMm: 0.006, correction: panelCorrection(0.121, -0.049, 0.003) },
    ],
    seams: [{ a: 'P1', b: 'P2', dx: 0.117, dy: -0.047, r: 0.126, uncertaintyMm: 0.008 }],
    lattice: {
      rotationDeg: 1.734, scaleX: 1.00021, scaleY: 0.99988, squarenessDeg: 0.0123, observed: true,
      uncertainty: { rotationDeg: 0.002, scaleX: 0.00004, scaleY: 0.00004, squarenessDeg: 0.003 },
    },
    camera: { focalPx: 3120.5, k1: -0.0123, k2: 0.0009 },
    summary: {
      matched: measured.length,
      missing: positions.length - measured.length,
      rmsMm: Math.sqrt(rs.reduce((s, r) => s + r * r, 0) / rs.length),
      maxMm: Math.max(...rs),
      out: out.length,
      marginal: marginal.length,
      verdict,
      sentence: `${verdict === 'fail' ? 'Fail' : 'Marginal'}: ${out.length} of ${measured.length} measured positions are out of tolerance (worst ${out[0]?.label ?? '-'}), ${marginal.length} are too close to call, and P2 sits off and should be reseated.`,
    },
  });
}
