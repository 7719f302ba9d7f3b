/** Spawns real worker processes (`tsx workers/worker.ts`) on a shared database file, and reads their JSON logs. */
import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
// `node --import tsx` rather than the `tsx` CLI: the CLI runs the script in a child process, so a signal sent
// to it (SIGKILL above all) would not reach the worker itself.
const nodeArgs = ['--import', 'tsx', 'workers/worker.ts'];

export interface LogLine { t: number; event: string; [k: string]: unknown }

export interface WorkerProc {
  child: ChildProcess;
  lines: LogLine[];
  stderr: string[];
  /** Resolves with the first log line that satisfies `pred` (already seen or yet to come). */
  waitFor: (pred: (l: LogLine) => boolean, timeoutMs?: number) => Promise<LogLine>;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

export function spawnWorker(env: Record<string, string>): WorkerProc {
  const child = spawn(process.execPath, nodeArgs, {
    cwd: root,
    // the outbox loop (mail) is not what these tests are about: MAIL_DELIVERY=0 keeps it off
    env: { ...process.env, NODE_ENV: 'test', WORKER_POLL_MS: '50', MAIL_DELIVERY: '0', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const lines: LogLine[] = [];
  const stderr: string[] = [];
  const waiters: { pred: (l: LogLine) => boolean; resolve: (l: LogLine) => void }[] = [];
  let buf = '';
  child.stdout!.setEncoding('utf8').on('data', (d: string) => {
    buf += d;
    let i;
    while ((i = buf.indexOf('\n')) >= 0) {
      const text = buf.slice(0, i);
      buf = buf.slice(i + 1);
      let line: LogLine;
      try { line = JSON.parse(text) as LogLine; } catch { continue; }
      lines.push(line);
      for (const w of [...waiters]) if (w.pred(line)) { waiters.splice(waiters.indexOf(w), 1); w.resolve(line); }
    }
  });
  child.stderr!.setEncoding('utf8').on('data', (d: string) => stderr.push(d));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => {
    child.on('exit', (code, signal) => resolve({ code, signal }));
  });
  const waitFor = (pred: (l: LogLine) => boolean, timeoutMs = 20_000) => new Promise<LogLine>((resolve, reject) => {
    const seen = lines.find(pred);
    if (seen) return resolve(seen);
    const timer = setTimeout(() => reject(new Error(`timed out waiting for a log line; stderr: ${stderr.join('').slice(-2000)}`)), timeoutMs);
    waiters.push({ pred, resolve: (l) => { clearTimeout(timer); resolve(l); } });
  });
  return { child, lines, stderr, waitFor, exited };
}

/** Sends SIGTERM and waits for the exit (SIGKILL after `ms`). */
export async function stopWorker(w: WorkerProc, ms = 10_000) {
  if (w.child.exitCode !== null || w.child.signalCode !== null) return w.exited;
  w.child.kill('SIGTERM');
  const timer = setTimeout(() => w.child.kill('SIGKILL'), ms);
  const r = await w.exited;
  clearTimeout(timer);
  return r;
}
