'use client';
/**
 * The report as a stranger with a share link sees it, below the verdict (SharedVerdict, drawn by the server):
 * figures, the deviation map, the positions and panels, the lattice figures and the comments — built from the
 * report helper's own pieces — and nothing of the photo or the rest of the workshop (the server sends none of
 * it: lib/services/share-report.ts).
 */
import '@/components/report/report.css';
import { useMemo, useState } from 'react';
import { BedMap, autoExaggeration, type MapItem } from '@/components/report/BedMap';
import { DistancesTable } from '@/components/report/DistancesTable';
import { LatticeFigures } from '@/components/report/LatticeFigures';
import { PanelsTable } from '@/components/report/PanelsTable';
import { PositionsTable, positionRows } from '@/components/report/PositionsTable';
import { CommentList, type CommentItem } from '@/components/comments/Comments';
import type { Report } from '@/lib/geometry/contract';
import { mapGeometry, nearestSpacing } from '@/lib/pdf/map';
import { formatLength, type LengthUnit } from '@/lib/report/units';

export interface SharedReportData {
  bedName: string;
  checkTitle: string | null;
  checkedAt: number | null;
  expiresAt: number;
  report: Report;
  comments: CommentItem[];
}

export function SharedReport({ data, token }: { data: SharedReportData; token: string }) {
  const [unit, setUnit] = useState<LengthUnit>('mm');
  const [selected, setSelected] = useState<string | null>(null);
  const r = data.report;
  const s = r.summary;
  const geometry = useMemo(() => mapGeometry(r), [r]);
  const spacing = useMemo(() => nearestSpacing(r.positions), [r]);
  const items: MapItem[] = useMemo(() => r.positions.map((p) => ({
    key: p.label, label: p.label, x: p.nominal.x, y: p.nominal.y, dx: p.deviation?.dx ?? null, dy: p.deviation?.dy ?? null, mark: p.verdict,
    title: p.deviation ? `${p.label}: ${formatLength(p.deviation.r, unit)} off, allowed ${formatLength(p.toleranceMm, unit)} — ${p.verdict}` : `${p.label}: not seen`,
  })), [r, unit]);
  const rows = useMemo(() => positionRows(r), [r]);
  return (
    <div className="flex flex-col gap-6" data-testid="shared-report-body">
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
        {([['Measured', `${s.matched}`], ['Out', `${s.out}`], ['Marginal', `${s.marginal}`], ['Not seen', `${s.missing}`], ['RMS off', formatLength(s.rmsMm, unit)], ['Largest', formatLength(s.maxMm, unit)]] as const).map(([k, v]) => (
          <div key={k} className="panel !p-3"><dt className="text-sm text-muted">{k}</dt><dd className="font-mono text-2xl font-bold">{v}</dd></div>
        ))}
      </dl>
      <div className="no-print flex flex-wrap gap-2">
        {(['mm', 'in'] as const).map((u) => (
          <button key={u} type="button" className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-pressed={unit === u} onClick={() => setUnit(u)}>{u === 'mm' ? 'mm' : 'inch'}</button>
        ))}
        <a className="btn btn-quiet" href={`/api/shared/${token}/report.pdf?units=${unit}`} download>PDF</a>
      </div>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-map-h">
        <h2 id="shared-map-h" className="text-xl font-bold">Deviation map</h2>
        <BedMap widthMm={geometry.widthMm} heightMm={geometry.heightMm} originX={geometry.originX} originY={geometry.originY} panels={geometry.panels} items={items} spacingMm={spacing} exaggeration={autoExaggeration(s.maxMm, spacing)} unit={unit} selected={selected} onSelect={setSelected} label="Map of the bed: each position's mark and how far it sits from where it should be" />
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-pos-h">
        <h2 id="shared-pos-h" className="text-xl font-bold">Positions</h2>
        <PositionsTable rows={rows} unit={unit} selected={selected} onSelect={setSelected} initialVerdict="problems" />
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-panels-h">
        <h2 id="shared-panels-h" className="text-xl font-bold">Panels</h2>
        <PanelsTable report={r} unit={unit} />
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-lattice-h">
        <h2 id="shared-lattice-h" className="text-xl font-bold">Scale and squareness</h2>
        <LatticeFigures report={r} unit={unit} bedWidthMm={null} bedHeightMm={null} />
        <DistancesTable report={r} unit={unit} />
      </section>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-comments-h">
        <h2 id="shared-comments-h" className="text-xl font-bold">Comments</h2>
        <CommentList comments={data.comments} onSelectPosition={setSelected} />
      </section>
    </div>
  );
}
