'use client';
/**
 * A bed's history: a timeline of its checks (newest first) and a trend of RMS deviation, largest deviation
 * and positions out, read from `GET /api/beds/{id}/checks`. Pick any two finished checks to compare them.
 */
import '@/components/report/report.css';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { api, errorText } from '@/components/api';
import { Verdict } from '@/components/Verdict';
import { formatLength, UNIT_DECIMALS, type LengthUnit } from '@/lib/report/units';
import { trendSeries, type HistoryRow } from './trend';
import { formatUtc, formatUtcDay } from '@/lib/dates';


export function BedHistory({ bedId, unit: initialUnit }: { bedId: string; unit: LengthUnit }) {
  const router = useRouter();
  const [unit, setUnit] = useState<LengthUnit>(initialUnit);
  const [pick, setPick] = useState<string[]>([]);
  const q = useQuery({ queryKey: ['bed-checks', bedId], queryFn: () => api<{ checks: HistoryRow[] }>(`/api/beds/${bedId}/checks`), refetchInterval: 15_000 });
  const series = useMemo(() => trendSeries(q.data?.checks ?? [], unit).map((p) => ({ ...p, name: `${p.title ? `${p.title} · ` : ''}${formatUtcDay(p.t)}` })), [q.data, unit]);
  if (q.isPending) return <p className="panel" aria-busy="true">Loading the checks…</p>;
  if (q.isError) return <p className="panel field-error" role="alert">{errorText(q.error)}</p>;
  const checks = q.data.checks;
  const finished = new Set(series.map((s) => s.id));
  const toggle = (id: string) => setPick((p) => (p.includes(id) ? p.filter((x) => x !== id) : [...p.slice(-1), id]));
  // compare older → newer
  const ordered = [...pick].sort((a, b) => (checks.find((c) => c.id === a)!.createdAt) - (checks.find((c) => c.id === b)!.createdAt));

  return (
    <div className="flex flex-col gap-6" data-testid="bed-history">
      <div className="flex flex-wrap gap-2">
        {(['mm', 'in'] as const).map((u) => <button key={u} type="button" className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-pressed={unit === u} onClick={() => setUnit(u)}>{u === 'mm' ? 'mm' : 'inch'}</button>)}
      </div>
      <section className="panel flex flex-col gap-3" aria-labelledby="trend-h">
        <h2 id="trend-h" className="text-xl font-bold">Trend</h2>
        {series.length < 2 ? (
          <p>{series.length === 0 ? 'No finished checks yet.' : 'One finished check so far; the trend starts with the second.'}</p>
        ) : (
          <div className="h-72 w-full" role="img" aria-label={`Trend over ${series.length} checks: RMS and largest deviation in ${unit}, positions out`}>
            <ResponsiveContainer width="100%" height="100%">
              <LineChart data={series} margin={{ top: 10, right: 8, bottom: 8, left: 4 }}>
                <CartesianGrid strokeDasharray="3 3" stroke="var(--line)" />
                <XAxis dataKey="name" tick={{ fill: 'var(--ink)', fontSize: 12 }} interval="preserveStartEnd" />
                <YAxis yAxisId="len" tick={{ fill: 'var(--ink)', fontSize: 12 }} width={52} tickFormatter={(v: number) => v.toFixed(UNIT_DECIMALS[unit] - 1)} label={{ value: unit, angle: -90, position: 'insideLeft', fill: 'var(--ink)' }} />
                <YAxis yAxisId="n" orientation="right" allowDecimals={false} tick={{ fill: 'var(--ink)', fontSize: 12 }} width={32} />
                <Tooltip contentStyle={{ background: 'var(--card)', color: 'var(--ink)', border: '1px solid var(--line)' }} />
                <Legend wrapperStyle={{ color: 'var(--ink)' }} />
                <Line yAxisId="len" type="monotone" dataKey="rms" name={`RMS off, ${unit}`} stroke="var(--mark-in)" strokeWidth={3} dot={{ r: 5 }} isAnimationActive={false} />
                <Line yAxisId="len" type="monotone" dataKey="max" name={`Largest, ${unit}`} stroke="var(--mark-marginal)" strokeWidth={3} strokeDasharray="8 4" dot={{ r: 5, strokeWidth: 2 }} isAnimationActive={false} />
                <Line yAxisId="n" type="stepAfter" dataKey="out" name="Positions out" stroke="var(--mark-out)" strokeWidth={3} strokeDasharray="2 3" dot={{ r: 5 }} isAnimationActive={false} />
              </LineChart>
            </ResponsiveContainer>
          </div>
        )}
      </section>

      <section className="panel flex flex-col gap-3" aria-labelledby="tl-h">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2 id="tl-h" className="text-xl font-bold">Checks</h2>
          <button type="button" className="btn" disabled={ordered.length !== 2} onClick={() => router.push(`/compare/${ordered[0]}/${ordered[1]}`)} data-testid="compare-picked">
            Compare the two picked
          </button>
        </div>
        <p className="text-sm text-muted">Tick two finished checks (before and after a rebuild, say) to see what changed.</p>
        {checks.length === 0 ? <p>No checks yet.</p> : (
          <ol className="flex flex-col" aria-label="Timeline, newest first">
            {checks.map((c) => (
              <li key={c.id} className="flex flex-wrap items-center gap-x-4 gap-y-2 border-b border-line py-3" data-testid="history-row">
                <label className="flex min-h-12 items-center gap-2">
                  <input type="checkbox" className="h-6 w-6" disabled={!finished.has(c.id)} checked={pick.includes(c.id)} onChange={() => toggle(c.id)} aria-label={`Pick ${c.title ?? formatUtc(c.createdAt)} to compare`} />
                </label>
                <div className="min-w-48 flex-1">
                  <p className="font-bold">{c.title ?? 'Check'}</p>
                  <p className="text-sm text-muted">{formatUtc(c.createdAt)}</p>
                </div>
                <Verdict status={c.status} verdict={c.verdict} />
                <p className="font-mono">{c.rmsMm !== null ? `RMS ${formatLength(c.rmsMm, unit)} · worst ${formatLength(c.maxMm ?? 0, unit)} · ${c.outCount ?? 0} out` : '—'}</p>
                {finished.has(c.id) ? <Link className="btn btn-quiet" href={`/checks/${c.id}/report`}>Report</Link> : <Link className="btn btn-quiet" href={`/checks/${c.id}`}>Open</Link>}
              </li>
            ))}
          </ol>
        )}
      </section>
    </div>
  );
}
