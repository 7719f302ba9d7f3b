import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ReportSchema } from '@/lib/geometry/contract';

const root = join(import.meta.dirname, '..', '..');
const fixtures = join(root, 'tests', 'fixtures', 'geometry');
const run = (...args: string[]) => spawnSync(join(root, 'node_modules', '.bin', 'tsx'), [join(root, 'lib', 'cli', 'analyze.ts'), ...args], { encoding: 'utf8', cwd: root });

describe('analyze CLI', () => {
  it('prints a valid report for the small-bed fixture and exits 0', () => {
    const r = run('--points', join(fixtures, 'small-bed.points.json'), '--pattern', join(fixtures, 'small-bed.pattern.json'));
    expect(r.status).toBe(0);
    const report = ReportSchema.parse(JSON.parse(r.stdout));
    expect(report.summary.matched).toBeGreaterThan(60);
    expect(report.positions[0]!.label).toBe('insert A1');
    // Both verdicts: every measured position has its hole-to-hole deviation, and the lattice its size check.
    expect(report.positions.filter((p) => p.measured).every((p) => p.form && ['in', 'marginal', 'out'].includes(p.form.verdict))).toBe(true);
    expect(report.lattice.shapeCheck?.toleranceMm).toBeGreaterThan(0);
    expect(report.summary.shapeSentence).toMatch(/^Overall size and squareness: /);
  });

  it('exits 2 with one line naming the field on bad input', () => {
    const dir = mkdtempSync(join(tmpdir(), 'gp-cli-'));
    writeFileSync(join(dir, 'bad.json'), '{"image": ');
    const bad = run('--points', join(dir, 'bad.json'), '--pattern', join(fixtures, 'small-bed.pattern.json'));
    expect(bad.status).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/points: .*not valid JSON/);
    const pts = JSON.parse(readFileSync(join(fixtures, 'small-bed.points.json'), 'utf8'));
    writeFileSync(join(dir, 'few.json'), JSON.stringify({ ...pts, holes: pts.holes.slice(0, 4) }));
    const few = run('--points', join(dir, 'few.json'), '--pattern', join(fixtures, 'small-bed.pattern.json'));
    expect(few.status).toBe(2);
    expect(few.stderr).toMatch(/^analyze: holes: /);
  });

  it('combines the distances of --distances FILE with the square and reports each with its residual', () => {
    const dir = mkdtempSync(join(tmpdir(), 'gp-cli-'));
    const plain = ReportSchema.parse(JSON.parse(run('--points', join(fixtures, 'small-bed.points.json'), '--pattern', join(fixtures, 'small-bed.pattern.json')).stdout));
    // The photo's own length between two far measured positions, given back as a tape reading of ±0.2 mm.
    const seen = plain.positions.filter((p) => p.measured);
    const a = seen[0]!, b = seen.reduce((p, c) => (Math.hypot(c.nominal.x - a.nominal.x, c.nominal.y - a.nominal.y) > Math.hypot(p.nominal.x - a.nominal.x, p.nominal.y - a.nominal.y) ? c : p));
    const mm = Math.hypot(b.measured!.x - a.measured!.x, b.measured!.y - a.measured!.y);
    writeFileSync(join(dir, 'd.json'), JSON.stringify([{ from: a.label, to: b.label, mm, sigmaMm: 0.2 }]));
    const r = run('--points', join(fixtures, 'small-bed.points.json'), '--pattern', join(fixtures, 'small-bed.pattern.json'), '--distances', join(dir, 'd.json'));
    expect(r.status).toBe(0);
    const report = ReportSchema.parse(JSON.parse(r.stdout));
    expect(report.distances).toHaveLength(1);
    expect(report.distances![0]).toMatchObject({ from: a.label, to: b.label, used: true });
    expect(Math.abs(report.distances![0]!.residualSigmas!)).toBeLessThan(3);
    writeFileSync(join(dir, 'bad.json'), JSON.stringify([{ from: a.label, to: b.label, mm: -5, sigmaMm: 0.2 }]));
    const bad = run('--points', join(fixtures, 'small-bed.points.json'), '--pattern', join(fixtures, 'small-bed.pattern.json'), '--distances', join(dir, 'bad.json'));
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/^analyze: distances\.0\.mm: /);
  });
});
