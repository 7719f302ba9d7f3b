'use client';
/** How far the measured positions are off, binned (lib/report/histogram.ts), with the tightest tolerance marked. */
import { Bar, BarChart, CartesianGrid, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Report } from '@/lib/geometry/contract';
import { binDeviations } from '@/lib/report/histogram';
import { formatLength, fromMm, type LengthUnit } from '@/lib/report/units';

export function DeviationHistogram({ report, unit }: { report: Report; unit: LengthUnit }) {
  const rs = report.positions.flatMap((p) => (p.deviation ? [p.deviation.r] : []));
  if (rs.length === 0) return <p>No measured positions to count.</p>;
  const tols = [...new Set(report.positions.map((p) => p.toleranceMm))].sort((a, b) => a - b);
  const tight = tols[0]!;
  const bins = binDeviations(rs, { maxBins: 14, coverMm: tight * 1.1 });
  const data = bins.map((b) => ({ name: `${formatLength(b.fromMm, unit, { suffix: false })}–${formatLength(b.toMm, unit, { suffix: false })}`, mid: fromMm((b.fromMm + b.toMm) / 2, unit), count: b.count, over: b.fromMm >= tight }));
  const width = bins.length ? bins[0]!.toMm - bins[0]!.fromMm : 1;
  const tolIndex = Math.min(bins.length - 1, tight / width - 0.5);
  return (
    <div className="flex flex-col gap-2">
      <div className="h-64 w-full" role="img" aria-label={`Histogram of ${rs.length} deviations; ${rs.filter((r) => r > tight).length} beyond ${formatLength(tight, unit)}`}>
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} margin={{ top: 16, right: 12, bottom: 28, left: 4 }}>
            <CartesianGrid strokeDasharray="3 3" stroke="var(--line)" vertical={false} />
            <XAxis dataKey="name" tick={{ fill: 'var(--ink)', fontSize: 12 }} interval="preserveStartEnd" label={{ value: `off by, ${unit}`, position: 'insideBottom', offset: -16, fill: 'var(--ink)' }} />
            <YAxis allowDecimals={false} tick={{ fill: 'var(--ink)', fontSize: 12 }} width={36} />
            <Tooltip formatter={(v) => [`${String(v)} positions`, 'count']} contentStyle={{ background: 'var(--card)', color: 'var(--ink)', border: '1px solid var(--line)' }} />
            <Bar dataKey="count" fill="var(--mark-in)" isAnimationActive={false} />
            <ReferenceLine x={data[Math.max(0, Math.round(tolIndex))]?.name} stroke="var(--mark-out)" strokeWidth={3} strokeDasharray="6 3" label={{ value: `allowed ${formatLength(tight, unit)}`, position: 'top', fill: 'var(--mark-out)', fontSize: 12 }} />
          </BarChart>
        </ResponsiveContainer>
      </div>
      <p className="text-sm text-muted">{rs.length} measured positions; the dashed line marks the tightest tolerance in this pattern ({tols.map((t) => formatLength(t, unit)).join(', ')}).</p>
    </div>
  );
}
