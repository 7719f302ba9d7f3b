/** A check's state in words and colour (never colour alone); a finished check's verdict in the report's words. */
import { BED_VERDICT_WORD } from '@/lib/report/words';

const STYLES: Record<string, { label: string; cls: string }> = {
  pass: { label: BED_VERDICT_WORD.pass, cls: 'bg-pass-bg text-pass border-pass' },
  marginal: { label: BED_VERDICT_WORD.marginal, cls: 'bg-warn-bg text-warn border-warn' },
  fail: { label: BED_VERDICT_WORD.fail, cls: 'bg-fail-bg text-fail border-fail' },
  queued: { label: 'Waiting', cls: 'bg-idle-bg text-idle border-idle' },
  running: { label: 'Measuring', cls: 'bg-idle-bg text-idle border-idle' },
  'needs-review': { label: 'Needs review', cls: 'bg-warn-bg text-warn border-warn' },
  failed: { label: 'Could not measure', cls: 'bg-fail-bg text-fail border-fail' },
  none: { label: 'Not checked yet', cls: 'bg-idle-bg text-idle border-idle' },
};

export function Verdict({ status, verdict }: { status?: string | null; verdict?: string | null }) {
  const key = status === 'done' ? (verdict ?? 'none') : (status ?? 'none');
  const s = STYLES[key] ?? { label: key, cls: 'bg-idle-bg text-idle border-idle' };
  return <span className={`inline-flex items-center rounded-md border-2 px-2.5 py-0.5 text-sm font-bold ${s.cls}`}>{s.label}</span>;
}
