/**
 * A check's state in words and colour (never colour alone); a finished check's verdict in the report's words
 * beside the report's mark for it (lib/report/words.ts, lib/report/palette.ts).
 */
import { BED_VERDICT_MARK, BED_VERDICT_WORD, type BedVerdict } from '@/lib/report/words';
import { MarkIcon, markVar } from './report/Mark';

const STYLES: Record<string, { label: string; cls: string }> = {
  queued: { label: 'Waiting', cls: 'bg-idle-bg text-idle border-idle' },
  running: { label: 'Measuring', cls: 'bg-idle-bg text-idle border-idle' },
  'needs-review': { label: 'Needs review', cls: 'bg-warn-bg text-warn border-warn' },
  failed: { label: 'Could not measure', cls: 'bg-fail-bg text-fail border-fail' },
  none: { label: 'Not checked yet', cls: 'bg-idle-bg text-idle border-idle' },
};

const isVerdict = (v: string): v is BedVerdict => v in BED_VERDICT_WORD;

export function Verdict({ status, verdict }: { status?: string | null; verdict?: string | null }) {
  const key = status === 'done' ? (verdict ?? 'none') : (status ?? 'none');
  if (isVerdict(key)) {
    const mark = BED_VERDICT_MARK[key];
    return (
      <span className="inline-flex items-center gap-1 rounded-md border-2 bg-card px-2 py-0.5 text-sm font-bold text-ink" style={{ borderColor: markVar(mark) }} data-mark={mark}>
        <MarkIcon mark={mark} size={16} />{BED_VERDICT_WORD[key]}
      </span>
    );
  }
  const s = STYLES[key] ?? { label: key, cls: 'bg-idle-bg text-idle border-idle' };
  return <span className={`inline-flex items-center rounded-md border-2 px-2.5 py-0.5 text-sm font-bold ${s.cls}`}>{s.label}</span>;
}
