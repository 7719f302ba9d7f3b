'use client';
/**
 * Two checks of one bed side by side (before → after): a change map (each position's move between the two
 * measurements, bed frame mm, front at the bottom, exaggerated), the panels' moves, and which changes are
 * larger than the two measurements' combined uncertainty at 95 % — all from `GET /api/checks/{a}/compare/{b}`
 * (the measurement core's comparison).
 */
import '@/components/report/report.css';
import Link from 'next/link';
import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { api, errorText } from '@/components/api';
import { useCheckDetail } from '@/components/report/CheckReport';
import { BedMap } from '@/components/report/BedMap';
import type { MapItem } from '@/lib/report/map-items';
import { MarkIcon } from '@/components/report/Mark';
import type { Comparison } from '@/lib/geometry';
import { BAND_K, bandRadiusMm } from '@/lib/geometry/band';
import type { Report } from '@/lib/geometry/contract';
import { mapGeometry, markRadiusMm, nearestSpacing, withOutline } from '@/lib/report/map';
import { autoExaggeration } from '@/lib/report/map-scale';
import { comparisonHeadline } from '@/lib/report/headline';
import { arrowScaleWords, MAP_EDGE_WORDS } from '@/lib/report/words';
import { formatAngle, formatLength, type LengthUnit } from '@/lib/report/units';
import { ExaggerationSelect } from '@/components/report/ExaggerationSelect';
import { formatUtc } from '@/lib/dates';


export function CompareView({ a, b, unit: initialUnit }: { a: string; b: string; unit: LengthUnit }) {
  const [unit, setUnit] = useState<LengthUnit>(initialUnit);
  const [exag, setExag] = useState<number | 'auto'>('auto');
  const [showAll, setShowAll] = useState(false);
  const cmp = useQuery({ queryKey: ['compare', a, b], queryFn: () => api<{ before: string; after: string; comparison: Comparison }>(`/api/checks/${a}/compare/${b}`) });
  const reportB = useQuery({ queryKey: ['check-report', b], queryFn: () => api<Report>(`/api/checks/${b}/report`) });
  const detA = useCheckDetail(a);
  const detB = useCheckDetail(b);

  const data = cmp.data?.comparison;
  const spacing = useMemo(() => (reportB.data ? nearestSpacing(reportB.data.positions) : 50), [reportB.data]);
  const items: MapItem[] = useMemo(() => {
    if (!data || !reportB.data) return [];
    const nominal = new Map(reportB.data.positions.map((p) => [`${p.family}:${p.col}:${p.row}`, p.nominal]));
    return data.positions.flatMap((c) => {
      const n = nominal.get(`${c.family}:${c.col}:${c.row}`);
      if (!n) return [];
      return [{ key: c.label, label: c.label, x: n.x, y: n.y, dx: c.dx, dy: c.dy, mark: c.significant ? 'out' as const : 'in' as const, emphasis: c.significant,
        title: `${c.label}: moved ${formatLength(c.r, unit)} (X ${formatLength(c.dx, unit, { signed: true })}, Y ${formatLength(c.dy, unit, { signed: true })}); 95 % noise band ${formatLength(bandRadiusMm(c.uncertaintyMm), unit)}${c.significant ? ' — a real change' : ''}` }];
    });
  }, [data, reportB.data, unit]);

  if (cmp.isPending || reportB.isPending || detA.isPending || detB.isPending) return <p className="panel" aria-busy="true">Comparing…</p>;
  const err = cmp.error ?? reportB.error ?? detA.error ?? detB.error;
  if (err || !data || !reportB.data || !detA.data || !detB.data) return <p className="panel field-error" role="alert">{errorText(err)}</p>;

  const geometry = mapGeometry(reportB.data.pattern.bed ? reportB.data : withOutline(reportB.data, detB.data.pattern));
  const autoX = autoExaggeration(data.positions.map((c) => c.r), spacing);
  const exaggeration = exag === 'auto' ? autoX : exag;
  const panelNote = new Map(data.panels.map((p) => [p.id, `${p.significant ? 'moved ' : ''}${formatLength(p.dx, unit, { signed: true, suffix: false })}, ${formatLength(p.dy, unit, { signed: true })}`]));
  const sorted = [...data.positions].sort((x, y) => Number(y.significant) - Number(x.significant) || y.r - x.r);
  const label = (d: typeof detA.data) => `${d.check.title ?? 'Check'} · ${formatUtc(d.check.finishedAt ?? d.check.createdAt)}`;

  return (
    <div className="flex flex-col gap-6" data-testid="compare-view">
      <section className="panel flex flex-col gap-2">
        <p><strong>Before:</strong> <Link className="underline" href={`/checks/${a}/report`}>{label(detA.data)}</Link></p>
        <p><strong>After:</strong> <Link className="underline" href={`/checks/${b}/report`}>{label(detB.data)}</Link></p>
        <p className="text-xl font-bold" data-testid="compare-sentence">{comparisonHeadline(data, unit)}</p>
        <p className="text-sm text-muted">A change is marked real when it is larger than the two measurements’ combined uncertainty at 95 % ({BAND_K.toFixed(2)} σ for a move in the plane). {data.summary.compared} positions compared; RMS change {formatLength(data.summary.rmsChangeMm, unit)}.{data.onlyInA.length + data.onlyInB.length > 0 ? ` Seen in one check only: ${data.onlyInA.length} before, ${data.onlyInB.length} after.` : ''}</p>
      </section>
      <div className="no-print flex flex-wrap items-end gap-3">
        {(['mm', 'in'] as const).map((u) => <button key={u} type="button" className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-pressed={unit === u} onClick={() => setUnit(u)}>{u === 'mm' ? 'mm' : 'inch'}</button>)}
        <ExaggerationSelect value={exag} autoFactor={autoX} onChange={setExag} />
      </div>
      <section className="panel flex flex-col gap-3" aria-labelledby="chg-h">
        <h2 id="chg-h" className="text-xl font-bold">Change map</h2>
        <div className="flex flex-wrap gap-4">
          <span className="inline-flex items-center gap-1.5"><MarkIcon mark="out" />moved more than the uncertainty</span>
          <span className="inline-flex items-center gap-1.5"><MarkIcon mark="in" />within the noise</span>
        </div>
        <BedMap widthMm={geometry.widthMm} heightMm={geometry.heightMm} originX={geometry.originX} originY={geometry.originY}
          panels={geometry.panels.map((q) => ({ ...q, note: panelNote.get(q.id) }))} items={items} spacingMm={spacing} markRadiusMm={markRadiusMm(geometry, spacing)} exaggeration={exaggeration} unit={unit}
          label={`Change map of ${items.length} positions from before to after, ${MAP_EDGE_WORDS.orientation}; ${arrowScaleWords(exaggeration)}.`} />
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="pm-h">
        <h2 id="pm-h" className="text-xl font-bold">Panel moves</h2>
        {data.panels.length === 0 ? <p>No panels to compare.</p> : (
          <div className="overflow-x-auto">
            <table className="w-full text-left" data-testid="panel-moves">
              <thead><tr className="border-b-2 border-line"><th className="py-2 pr-4">Panel</th><th className="pr-4">Moved X</th><th className="pr-4">Y</th><th className="pr-4">Turned</th><th className="pr-4">±1σ</th><th>Real change?</th></tr></thead>
              <tbody>
                {data.panels.map((p) => (
                  <tr key={p.id} className={`border-b border-line ${p.significant ? 'font-bold' : ''}`}>
                    <td className="py-2 pr-4">{p.id}</td>
                    <td className="pr-4 font-mono">{formatLength(p.dx, unit, { signed: true })}</td>
                    <td className="pr-4 font-mono">{formatLength(p.dy, unit, { signed: true })}</td>
                    <td className="pr-4 font-mono">{formatAngle(p.rotationDeg, { signed: true })}</td>
                    <td className="pr-4 font-mono">{formatLength(p.uncertaintyMm, unit)}</td>
                    <td>{p.significant ? 'Yes — moved' : 'No'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="pc-h">
        <h2 id="pc-h" className="text-xl font-bold">Positions that changed most</h2>
        <div className="overflow-x-auto">
          <table className="w-full text-left" data-testid="position-changes">
            <thead><tr className="border-b-2 border-line"><th className="py-2 pr-4">Position</th><th className="pr-4">Moved</th><th className="pr-4">X</th><th className="pr-4">Y</th><th className="pr-4">Noise band (95 %)</th><th>Real?</th></tr></thead>
            <tbody className="font-mono">
              {(showAll ? sorted : sorted.slice(0, 25)).map((c) => (
                <tr key={c.label} className={`border-b border-line ${c.significant ? 'font-bold' : ''}`} data-significant={c.significant}>
                  <td className="py-2 pr-4">{c.label}</td><td className="pr-4">{formatLength(c.r, unit)}</td><td className="pr-4">{formatLength(c.dx, unit, { signed: true })}</td><td className="pr-4">{formatLength(c.dy, unit, { signed: true })}</td><td className="pr-4">{formatLength(bandRadiusMm(c.uncertaintyMm), unit)}</td><td>{c.significant ? 'yes' : 'no'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {!showAll && sorted.length > 25 && <button type="button" className="btn btn-quiet no-print self-start" onClick={() => setShowAll(true)}>Show all {sorted.length}</button>}
      </section>
    </div>
  );
}
