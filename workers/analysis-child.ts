/**
 * The analysis process: forked by the worker (workers/isolate.ts) and reused job after job, it runs the pure,
 * heavy part of an analysis, photo bytes → points (lib/vision) and points → report (lib/geometry), and
 * nothing else: no database, no storage, no network. Its memory is capped by the parent
 * (--max-old-space-size and a resident-memory watch) and its time by the parent's clock; when it breaks
 * either, or crashes, the parent kills it and starts another, and only that job fails.
 *
 * opencv-wasm and the analysis code load once, when the process starts ('ready' says how long it took).
 * It leaves when the parent goes (the IPC channel closes) or stops it (SIGTERM); it ignores SIGINT.
 */
import { analysisDeps, warmAnalysis } from '@/lib/checks/pipeline';
import type { ChildMessage, ParentMessage, TestHog } from './analysis-protocol';

const send = (m: ChildMessage) => new Promise<void>((resolve) => {
  if (!process.connected) return resolve();
  process.send!(m, undefined, undefined, () => resolve());
});
const maxRssKb = () => process.resourceUsage().maxRSS;

/** Waiting for the parent to say the quality verdict was stored (vision goes on only after that). */
const qualityStored = new Map<number, () => void>();

/** Test hooks (never in production): misbehave as a runaway analysis would. */
function misbehave(hog: TestHog | undefined): void {
  if (!hog || process.env.NODE_ENV === 'production') return;
  if (hog === 'crash') process.abort();
  if (hog === 'spin') for (;;) { /* a loop that never ends, as a runaway search would */ }
  const keep: unknown[] = [];
  // without bound: the JS heap (numbers in arrays) or native memory (buffers outside the heap, as images are)
  for (let i = 0; ; i++) keep.push(hog === 'heap' ? new Array(1 << 20).fill(i) : Buffer.alloc(64 << 20, i & 0xff));
}

async function handle(m: ParentMessage): Promise<void> {
  if (m.type === 'quality-stored') {
    qualityStored.get(m.id)?.();
    qualityStored.delete(m.id);
    return;
  }
  try {
    misbehave(m.hog);
    let value;
    if (m.type === 'detect') {
      const bytes = Buffer.from(m.bytes.buffer, m.bytes.byteOffset, m.bytes.byteLength);
      value = await analysisDeps.detect(bytes, {
        pattern: m.pattern,
        referenceMm: m.referenceMm,
        corners: m.corners,
        onStage: (name, fraction) => { void send({ type: 'stage', id: m.id, name, ...(fraction !== undefined ? { fraction } : {}) }); },
        ...(m.wantsQuality ? {
          onQuality: (quality) => new Promise<void>((resolve) => {
            qualityStored.set(m.id, resolve);
            void send({ type: 'quality', id: m.id, quality });
          }),
        } : {}),
      });
    } else {
      value = await analysisDeps.analyze(m.points, m.pattern, m.distances ? { distances: m.distances } : {});
    }
    await send({ type: 'result', id: m.id, value, maxRssKb: maxRssKb() });
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    await send({ type: 'error', id: m.id, error: { name: err.name, message: err.message, inputError: analysisDeps.isInputError(e) }, maxRssKb: maxRssKb() });
  }
}

process.on('message', (m: ParentMessage) => { void handle(m); });
process.on('disconnect', () => process.exit(0));
// Ctrl-C in a terminal reaches the whole process group: the worker decides when this process ends (it lets the
// job in hand finish, then stops it), so the interrupt is not this process's to act on
process.on('SIGINT', () => undefined);

const t0 = performance.now();
warmAnalysis().then(
  () => send({ type: 'ready', ms: Math.round(performance.now() - t0) }),
  // the first job will load what is missing and say what failed
  () => send({ type: 'ready', ms: Math.round(performance.now() - t0) }),
).catch(() => undefined);
