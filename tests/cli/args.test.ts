/** Command-line options of the scripts: strict node:util parseArgs, --help, one-line usage errors. */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { joinNegativeNumbers } from '@/lib/cli/args';

const root = join(import.meta.dirname, '..', '..');
const tsx = join(root, 'node_modules', '.bin', 'tsx');
const run = (script: string, ...args: string[]) => spawnSync(tsx, [join(root, 'lib', 'cli', script), ...args], { encoding: 'utf8', cwd: root });
const fixtures = join(root, 'tests', 'fixtures', 'geometry');

describe('script options', () => {
  it('takes a negative number after a value-taking option as its value, and leaves flags and other options alone', () => {
    const options = { k1: { type: 'string' as const }, edge: { type: 'boolean' as const } };
    expect(joinNegativeNumbers(['--k1', '-0.03', '--edge'], options)).toEqual(['--k1=-0.03', '--edge']);
    expect(joinNegativeNumbers(['--k1', '-.5'], options)).toEqual(['--k1=-.5']);
    // a boolean before a negative number, or an option after a value-taking one, is not joined
    expect(joinNegativeNumbers(['--edge', '-1'], options)).toEqual(['--edge', '-1']);
    expect(joinNegativeNumbers(['--k1', '--edge'], options)).toEqual(['--k1', '--edge']);
  });

  it('prints the usage for --help and exits 0', () => {
    const r = run('analyze.ts', '--help');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/--points FILE/);
    expect(r.stdout).toMatch(/--reference-mm MM/);
    const s = run('restore.ts', '-h');
    expect(s.status).toBe(0);
    expect(s.stdout).toMatch(/--from DIR/);
  });

  it('refuses an unknown option, a missing value and a stray argument with one line and exit 2', () => {
    const pattern = join(fixtures, 'small-bed.pattern.json'), points = join(fixtures, 'small-bed.points.json');
    for (const [args, message] of [
      [['--points', points, '--pattern', pattern, '--bogus'], /^analyze: Unknown option '--bogus' \(see --help\)$/],
      [['--points', points, '--pattern'], /^analyze: Option '--pattern <value>' argument missing/],
      [['--points', points, '--pattern', pattern, 'extra'], /^analyze: Unexpected argument 'extra'/],
      [['--points', points, '--pattern', pattern, '--corners', '1,2,3,4,5,6,7,8'], /^analyze: --corners: taken with --image only/],
      [['--points', points, '--pattern', pattern, '--corner-sigma', '-1'], /^analyze: --corner-sigma: must be a positive number of px$/],
    ] as const) {
      const r = run('analyze.ts', ...args);
      expect(r.status, args.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr.trim()).toMatch(message);
    }
    const b = run('backup.ts', '--outdir', 'x');
    expect(b.status).toBe(2);
    expect(b.stderr).toMatch(/^backup: Unknown option '--outdir'/);
  });
});
