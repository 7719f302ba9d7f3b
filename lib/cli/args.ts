/**
 * Command-line options of the project's scripts, read by node:util `parseArgs` in strict mode: an unknown option,
 * a missing value or a stray argument is an error. `--help` (or `-h`) prints the script's usage on stdout and exits
 * 0; an error prints one line, `<script>: <what is wrong> (see --help)`, on stderr and exits 2.
 *
 * A negative number after an option that takes a value is that option's value (`--k1 -0.03`), as `--k1=-0.03`
 * would be; `parseArgs` alone refuses it as ambiguous.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';

type ParseArgsOptionsConfig = NonNullable<ParseArgsConfig['options']>;

/** What a script tells about itself: its name (the prefix of its error lines) and its usage text for --help. */
export interface CliUsage {
  name: string;
  usage: string;
}

/** Prints `<name>: <message>` on stderr and exits 2 (bad input or bad usage). */
export function exitWithUsageError(name: string, message: string): never {
  process.stderr.write(`${name}: ${message}\n`);
  process.exit(2);
}

/** `args` with every `--opt -number` of a value-taking option joined into `--opt=-number`. */
export function joinNegativeNumbers(args: readonly string[], options: ParseArgsOptionsConfig): string[] {
  const takesValue = new Set(Object.entries(options).filter(([, o]) => o.type === 'string').map(([k]) => `--${k}`));
  const out: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!, next = args[i + 1];
    if (takesValue.has(a) && next !== undefined && /^-(\d|\.\d)/.test(next)) { out.push(`${a}=${next}`); i++; } else out.push(a);
  }
  return out;
}

/**
 * The options of `args` (default: this process's) as `parseArgs` reads them with `options`, strict and without
 * positionals; handles --help and usage errors as the module header says.
 */
export function parseCliArgs<const O extends ParseArgsOptionsConfig>(cli: CliUsage, options: O, args: readonly string[] = process.argv.slice(2)) {
  if (args.includes('--help') || args.includes('-h')) {
    process.stdout.write(`${cli.usage.trim()}\n`);
    process.exit(0);
  }
  try {
    return parseArgs({ args: joinNegativeNumbers(args, options), options, strict: true, allowPositionals: false }).values;
  } catch (e) {
    const message = e instanceof Error ? e.message.split('\n')[0]! : String(e);
    return exitWithUsageError(cli.name, `${message} (see --help)`);
  }
}

/** The number an option holds, or undefined when absent; not a finite number, or out of `check`, exits 2. */
export function numberOption(cli: CliUsage, name: string, value: string | undefined, check?: { positive?: boolean; unit?: string }): number | undefined {
  if (value === undefined) return undefined;
  const x = Number(value);
  if (value.trim() === '' || !Number.isFinite(x)) exitWithUsageError(cli.name, `--${name} needs a number${check?.unit ? ` of ${check.unit}` : ''}`);
  if (check?.positive && !(x > 0)) exitWithUsageError(cli.name, `--${name}: must be a positive number${check.unit ? ` of ${check.unit}` : ''}`);
  return x;
}
