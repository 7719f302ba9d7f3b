/** A check's state in words and colour (never colour alone). */
const STYLES: Record<string, { label: string; cls: string }> = {
  pass: { label: 'Pass', cls: 'bg-pass-bg text-pass border-pass' },
  marginal: { label: 'Marginal', cls: 'bg-warn-bg text-warn border-warn' },
  fail: { label: 'Fail', cls: 'bg-fail-bg text-fail border-fail' },
  queued: { label: 'Waiting', cls: 'bg-idle-bg text-idle border-idle' },
  running: { label: 'Measuring', cls: 'bg-idle-bg text-idle border-idle' },
  'needs-review': { label: 'Needs review', cls: 'bg-warn-bg text-warn border-warn' },
  failed: { label: 'Could not measure', cls: 'bg-fail-bg text-fail border-fail' },
  none: { label: 'Not checked yet', cls: 'bg-idle-bg text-idle border-idle' },
};

type ReportVerdict = 'pass' | 'marginal' | 'fail';
/** Border, ground and text classes of a report's verdict box. */
export const VERDICT_BOX: Record<ReportVerdict, string> = { pass: 'border-pass bg-pass-bg text-pass', marginal: 'border-warn bg-warn-bg text-warn', fail: 'border-fail bg-fail-bg text-fail' };
/** The verdict in one word. */
export const VERDICT_WORD: Record<ReportVerdict, string> = { pass: STYLES.pass!.label, marginal: STYLES.marginal!.label, fail: STYLES.fail!.label };

export function Verdict({ status, verdict }: { status?: string | null; verdict?: string | null }) {
  const key = status === 'done' ? (verdict ?? 'none') : (status ?? 'none');
  const s = STYLES[key] ?? { label: key, cls: 'bg-idle-bg text-idle border-idle' };
  return <span className={`inline-flex items-center rounded-md border-2 px-2.5 py-0.5 text-sm font-bold ${s.cls}`}>{s.label}</span>;
}
