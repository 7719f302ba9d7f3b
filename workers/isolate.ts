/**
 * A worker whose analysis fails alone: the heavy, pure part of each analysis (photo bytes → points, points →
 * report) runs in a separate Node process (workers/analysis-child.ts, forked under tsx), kept and reused from
 * job to job so opencv-wasm compiles once. The worker process keeps everything else: claiming, the lease,
 * progress and results in the database.
 *
 * A process rather than a worker thread: a thread shares the worker's address space, so native memory
 * (sharp's decoder, opencv-wasm's heap) cannot be capped per thread, and V8's fatal errors ("invalid size
 * error", heap exhaustion outside resource limits) abort the whole process; a child process can always be
 * measured and killed (SIGKILL) without touching the job loop.
 *
 * Limits of one analysis process (`IsolationOptions`):
 * - memory: `--max-old-space-size=memoryMb` for its JavaScript heap, and its resident memory (Linux:
 *   /proc/<pid>/status VmRSS, read every `watchMs`) for everything else; over the cap it is killed;
 * - time: the job's time inside the process (warm-up excluded) may not pass `timeoutMs`; then it is killed;
 * - reuse: a process whose resident memory after a step is above half the cap is replaced before the next.
 * A kill, a crash or a fatal error rejects the call with `AnalysisLimitError` naming the reason (retried by
 * the loop like any passing failure; the check shows the reason after the last attempt), and the next call
 * gets a fresh process. Input errors (no square, unreadable photo, points that do not fit the pattern) come
 * back as `IsolatedInputError`, which `isInputError` recognises, so the job fails at once as before.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { ClaimedJob } from '@/db/queries/jobs';
import { AnalysisLimitError, type AnalysisDeps, type DetectOptions, type FitOptions } from '@/lib/checks/run-analysis';
import type { Pattern, PhotoQuality, Points, Report } from '@/lib/geometry/contract';
import type { ChildMessage, ParentMessage, SerialError, TestHog } from './analysis-protocol';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const CHILD = fileURLToPath(new URL('./analysis-child.ts', import.meta.url));

export interface IsolationOptions {
  /** Cap of one analysis process's memory (JS heap and resident set), MB. */
  memoryMb: number;
  /** Wall-clock limit of one job's analysis (its time inside the analysis process), ms. */
  timeoutMs: number;
  /** How often the resident memory is read while an analysis runs, ms (default 100). */
  watchMs?: number;
  /** How long a new analysis process may take to load opencv-wasm and the analysis code, ms (default 120000). */
  startMs?: number;
  log?: (event: string, fields?: Record<string, unknown>) => void;
}

/** An input error thrown inside the analysis process (VisionInputError, GeometryInputError), its class name kept. */
export class IsolatedInputError extends Error {
  constructor(e: SerialError) {
    super(e.message);
    this.name = e.name;
  }
}

/** Resident memory of a process, MB (Linux /proc), or undefined where it cannot be read. */
export function residentMb(pid: number): number | undefined {
  try {
    const m = /VmRSS:\s+(\d+)\s+kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) / 1024 : undefined;
  } catch {
    return undefined;
  }
}

/** What V8 prints when it gives up for want of memory (heap limit reached, an allocation too large). */
const OUT_OF_MEMORY = /heap out of memory|Reached heap limit|invalid (?:size|array length|table size)|Allocation failed|Cannot allocate memory|std::bad_alloc/i;

interface Pending {
  id: number;
  resolve: (v: Points | Report) => void;
  reject: (e: Error) => void;
  onStage?: DetectOptions['onStage'];
  onQuality?: DetectOptions['onQuality'];
}

let nextId = 1;

/** One analysis process: started, warmed, asked one thing at a time, killed when it breaks a limit. */
class AnalysisProcess {
  readonly child: ChildProcess;
  readonly ready: Promise<void>;
  readonly exited: Promise<void>;
  private stderrTail = '';
  private pending: Pending | null = null;
  private killReason: string | null = null;
  /** Peak resident memory of this process so far, MB (from the process itself and from the watch). */
  peakMb = 0;

  constructor(private readonly opts: IsolationOptions) {
    this.child = fork(CHILD, [], {
      cwd: ROOT,
      execArgv: ['--import', 'tsx', `--max-old-space-size=${opts.memoryMb}`],
      serialization: 'advanced',
      stdio: ['ignore', 'pipe', 'pipe', 'ipc'],
    });
    // the child writes nothing to stdout by design; whatever it prints goes to stderr, away from the JSON log
    this.child.stdout!.on('data', (d: Buffer) => process.stderr.write(d));
    this.child.stderr!.on('data', (d: Buffer) => {
      this.stderrTail = (this.stderrTail + d.toString('utf8')).slice(-4000);
      process.stderr.write(d);
    });
    this.ready = new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => {
        this.kill(`could not start within ${Math.round((opts.startMs ?? 120_000) / 1000)} s`);
      }, opts.startMs ?? 120_000);
      const onMessage = (m: ChildMessage) => {
        if (m.type !== 'ready') return;
        clearTimeout(timer);
        this.child.off('message', onMessage);
        opts.log?.('analysis.ready', { pid: this.child.pid, ms: m.ms });
        resolve();
      };
      this.child.on('message', onMessage);
      this.child.once('exit', (code, signal) => { clearTimeout(timer); reject(this.limitError(code, signal)); });
    });
    this.ready.catch(() => undefined);
    this.child.on('message', (m: ChildMessage) => this.onMessage(m));
    this.exited = new Promise<void>((resolve) => {
      this.child.once('exit', (code, signal) => {
        const error = this.limitError(code, signal);
        opts.log?.('analysis.exit', { pid: this.child.pid, code, signal, reason: error.reason });
        const p = this.pending;
        this.pending = null;
        p?.reject(error);
        resolve();
      });
    });
  }

  get alive(): boolean {
    return this.child.exitCode === null && this.child.signalCode === null;
  }

  /** Why the process ended, in words for the person (after "The analysis …"). */
  private limitError(code?: number | null, signal?: NodeJS.Signals | null): AnalysisLimitError {
    if (this.killReason) return new AnalysisLimitError(this.killReason);
    if (OUT_OF_MEMORY.test(this.stderrTail)) return new AnalysisLimitError(`ran out of memory (cap ${this.opts.memoryMb} MB)`);
    // a SIGKILL this worker did not send: the system's out-of-memory killer, most often
    if (signal === 'SIGKILL') return new AnalysisLimitError('process was killed by the system (signal SIGKILL; it does that when the machine runs out of memory)');
    return new AnalysisLimitError(`process stopped unexpectedly (${signal ? `signal ${signal}` : `exit code ${code ?? '?'}`})`);
  }

  /** Ends the process (at once unless `signal` says otherwise), remembering why. */
  kill(reason: string, signal: NodeJS.Signals = 'SIGKILL'): void {
    if (!this.alive) return;
    this.killReason ??= reason;
    this.child.kill(signal);
  }

  private onMessage(m: ChildMessage): void {
    const p = this.pending;
    if (!p || !('id' in m) || m.id !== p.id) return;
    switch (m.type) {
      case 'stage':
        p.onStage?.(m.name, m.fraction);
        return;
      case 'quality': {
        const stored = p.onQuality ? p.onQuality(m.quality as PhotoQuality).catch(() => undefined) : Promise.resolve();
        void stored.then(() => this.post({ type: 'quality-stored', id: m.id }));
        return;
      }
      case 'result':
      case 'error': {
        this.peakMb = Math.max(this.peakMb, m.maxRssKb / 1024);
        this.pending = null;
        if (m.type === 'result') p.resolve(m.value);
        else p.reject(m.error.inputError ? new IsolatedInputError(m.error) : Object.assign(new Error(m.error.message), { name: m.error.name }));
      }
    }
  }

  private post(m: ParentMessage): void {
    if (this.alive && this.child.connected) this.child.send(m, (err) => { if (err) this.kill(`process could not be reached (${err.message})`); });
  }

  /** Sends one request and waits for its answer, within `limitMs`, watching the memory meanwhile. */
  async request(m: ParentMessage & { id: number }, hooks: Pick<Pending, 'onStage' | 'onQuality'>, limitMs: number): Promise<Points | Report> {
    await this.ready;
    if (!this.alive) throw this.limitError();
    const watchMs = this.opts.watchMs ?? 100;
    const pid = this.child.pid!;
    let timer: NodeJS.Timeout | undefined;
    let watch: NodeJS.Timeout | undefined;
    try {
      return await new Promise<Points | Report>((resolve, reject) => {
        this.pending = { id: m.id, resolve, reject, ...hooks };
        timer = setTimeout(() => this.kill(`took longer than ${Math.round(this.opts.timeoutMs / 1000)} s`), Math.max(0, limitMs));
        watch = setInterval(() => {
          const mb = residentMb(pid);
          if (mb === undefined) return;
          this.peakMb = Math.max(this.peakMb, mb);
          if (mb > this.opts.memoryMb) this.kill(`ran out of memory (cap ${this.opts.memoryMb} MB)`);
        }, watchMs);
        this.post(m);
      });
    } finally {
      clearTimeout(timer);
      clearInterval(watch);
    }
  }
}

/** The test hook of a job's payload (`testHog`), honoured only outside production. */
function hogOf(job: Pick<ClaimedJob, 'payloadJson'>): TestHog | undefined {
  if (process.env.NODE_ENV === 'production') return undefined;
  try {
    const hog = (JSON.parse(job.payloadJson) as { testHog?: unknown }).testHog;
    return hog === 'heap' || hog === 'native' || hog === 'spin' || hog === 'crash' ? hog : undefined;
  } catch {
    return undefined;
  }
}

/** Analysis processes for a worker's jobs: one per job in hand, reused from job to job. */
export class AnalysisPool {
  private idle: AnalysisProcess[] = [];
  private readonly all = new Set<AnalysisProcess>();
  private readonly killAll = () => { for (const p of this.all) p.child.kill('SIGKILL'); };

  constructor(readonly opts: IsolationOptions) {
    process.on('exit', this.killAll);
  }

  private spawn(): AnalysisProcess {
    const p = new AnalysisProcess(this.opts);
    this.all.add(p);
    void p.exited.then(() => {
      this.all.delete(p);
      this.idle = this.idle.filter((q) => q !== p);
    });
    return p;
  }

  /** Starts one analysis process ahead of the first job and waits until it has loaded; returns ms. */
  async warm(): Promise<number> {
    const t0 = performance.now();
    const p = this.idle.find((q) => q.alive) ?? this.spawn();
    if (!this.idle.includes(p)) this.idle.push(p);
    await p.ready;
    return Math.round(performance.now() - t0);
  }

  private acquire(): AnalysisProcess {
    for (let p = this.idle.pop(); p; p = this.idle.pop()) if (p.alive) return p;
    return this.spawn();
  }

  /**
   * Back to the idle list after a step, unless its resident memory is already above half the cap (opencv-wasm's
   * memory grows and is never given back): such a process is ended now, between jobs, and the next step starts
   * a fresh one, rather than a later job running into the cap.
   */
  private release(p: AnalysisProcess): void {
    if (!p.alive || !this.all.has(p)) return;
    const mb = residentMb(p.child.pid!);
    if (mb !== undefined && mb > this.opts.memoryMb / 2) {
      this.opts.log?.('analysis.recycle', { pid: p.child.pid, residentMb: Math.round(mb), capMb: this.opts.memoryMb });
      p.kill('was replaced after a job (resident memory above half the cap)', 'SIGTERM');
      return;
    }
    this.idle.push(p);
  }

  /** Process ids of the analysis processes now running (for tests and logs). */
  pids(): number[] {
    return [...this.all].filter((p) => p.alive).map((p) => p.child.pid!);
  }

  /**
   * The analysis of one job, each step in an analysis process; the job's time limit counts from its first
   * step. `log` receives one `job.analysis` event per step (ms, peak memory of the process and of this one).
   */
  forJob(job: Pick<ClaimedJob, 'payloadJson'>, log?: (event: string, detail: Record<string, unknown>) => void): AnalysisDeps {
    let usedMs = 0;
    let hog = hogOf(job);
    const run = async (step: 'detect' | 'fit', build: (id: number, hog?: TestHog) => ParentMessage & { id: number }, hooks: Pick<Pending, 'onStage' | 'onQuality'>) => {
      const remaining = this.opts.timeoutMs - usedMs;
      if (remaining <= 0) throw new AnalysisLimitError(`took longer than ${Math.round(this.opts.timeoutMs / 1000)} s`);
      const p = this.acquire();
      await p.ready.catch(() => undefined);
      const t0 = performance.now();
      const message = build(nextId++, hog);
      hog = undefined;
      try {
        return await p.request(message, hooks, remaining);
      } finally {
        const ms = performance.now() - t0;
        usedMs += ms;
        this.release(p);
        log?.('job.analysis', { step, ms: Math.round(ms), pid: p.child.pid, childPeakMb: Math.round(p.peakMb), parentPeakMb: Math.round(process.resourceUsage().maxRSS / 1024) });
      }
    };
    return {
      detect: async (bytes: Buffer, o: DetectOptions) => (await run('detect', (id, h) => ({
        type: 'detect', id, bytes, pattern: o.pattern, referenceMm: o.referenceMm, corners: o.corners, wantsQuality: !!o.onQuality, ...(h ? { hog: h } : {}),
      }), { onStage: o.onStage, onQuality: o.onQuality })) as Points,
      analyze: async (points: Points, pattern: Pattern, options?: FitOptions) => (await run('fit', (id, h) => ({
        type: 'analyze', id, points, pattern, ...(options?.distances ? { distances: options.distances } : {}), ...(h ? { hog: h } : {}),
      }), {})) as Report,
      isInputError: (e) => e instanceof IsolatedInputError,
    };
  }

  /** Stops every analysis process (SIGTERM, SIGKILL after `ms`) and waits for them. */
  async close(ms = 5_000): Promise<void> {
    process.off('exit', this.killAll);
    const all = [...this.all];
    for (const p of all) p.kill('was stopped with the worker', 'SIGTERM');
    const timer = setTimeout(() => { for (const p of all) p.child.kill('SIGKILL'); }, ms);
    await Promise.all(all.map((p) => p.exited));
    clearTimeout(timer);
  }
}
