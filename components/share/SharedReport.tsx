'use client';
/**
 * The report as a stranger with a share link sees it, below the verdict (SharedVerdict, drawn by the server):
 * figures, the deviation map, the positions and panels, the lattice figures, the method note and the comments —
 * built from the report helper's own pieces — and nothing of the photo or the rest of the workshop (the server sends none of
 * it: lib/services/share-report.ts).
 */
import '@/components/report/report.css';
import { useMemo, useState } from 'react';
import { BedMap } from '@/components/report/BedMap';
import { MapLegend } from '@/components/report/MapLegend';
import { DistancesTable } from '@/components/report/DistancesTable';
import { LatticeFigures } from '@/components/report/LatticeFigures';
import { PanelsTable } from '@/components/report/PanelsTable';
import { PositionsTable, positionRows } from '@/components/report/PositionsTable';
import { CommentList, type CommentItem } from '@/components/comments/Comments';
import { MM_PER_IN, type Report } from '@/lib/geometry/contract';
import { mapGeometry, markRadiusMm, nearestSpacing } from '@/lib/report/map';
import { reportArrowScale } from '@/lib/report/map-scale';
import type { LengthUnit } from '@/lib/report/units';
import { hasFormView, type MapView } from '@/lib/report/words';
import { reportMapItems } from '@/lib/report/map-items';
import { MapViewSwitch } from '@/components/report/MapViewSwitch';
import { MethodNote } from '@/components/report/MethodNote';
import type { FitFamily } from '@/lib/report/method-note';

export interface SharedReportData {
  bedName: string;
  checkTitle: string | null;
  checkedAt: number | null;
  expiresAt: number;
  report: Report;
  /** The pattern's families for the method note; null when the pattern is gone. */
  fits: FitFamily[] | null;
  comments: CommentItem[];
}

/** The bed's width or depth in mm from the outline the report carries (pattern units), or null without one. */
const bedMm = (r: Report, side: 'width' | 'height'): number | null => (r.pattern.bed ? r.pattern.bed[side] * (r.pattern.units === 'in' ? MM_PER_IN : 1) : null);

/** The shared report's body in `unit`, the unit of the page's headline (its switch reloads the page in the other). */
export function SharedReport({ data, token, unit }: { data: SharedReportData; token: string; unit: LengthUnit }) {
  const [selected, setSelected] = useState<string | null>(null);
  const [view, setView] = useState<MapView>('bed');
  const r = data.report;
  const geometry = useMemo(() => mapGeometry(r), [r]);
  const spacing = useMemo(() => nearestSpacing(r.positions), [r]);
  const exaggeration = useMemo(() => reportArrowScale(r), [r]);
  const formView = useMemo(() => hasFormView(r), [r]);
  const shown: MapView = formView ? view : 'bed';
  const items = useMemo(() => reportMapItems(r, shown, unit), [r, unit, shown]);
  const rows = useMemo(() => positionRows(r), [r]);
  return (
    <div className="flex flex-col gap-6" data-testid="shared-report-body">
      <div className="no-print flex flex-wrap gap-2">
        {(['mm', 'in'] as const).map((u) => (
          <a key={u} className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-current={unit === u ? 'true' : undefined} href={`?units=${u}`}>{u === 'mm' ? 'mm' : 'inch'}</a>
        ))}
        <a className="btn btn-quiet" href={`/api/shared/${token}/report.pdf?units=${unit}`} download>PDF</a>
      </div>
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-map-h">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="shared-map-h" className="text-xl font-bold">Deviation map</h2>
          {formView && <MapViewSwitch value={shown} onChange={setView} className="no-print" />}
        </div>
        <MapLegend report={r} view={shown} formView={formView} exaggeration={exaggeration} />
        <BedMap widthMm={geometry.widthMm} heightMm={geometry.heightMm} originX={geometry.originX} originY={geometry.originY} panels={geometry.panels} items={items} spacingMm={spacing} markRadiusMm={markRadiusMm(geometry, spacing)} exaggeration={exaggeration} unit={unit} selected={selected} onSelect={setSelected} label="Map of the bed: each position's mark and how far it sits from where it should be" />
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
        <LatticeFigures report={r} unit={unit} bedWidthMm={bedMm(r, 'width')} bedHeightMm={bedMm(r, 'height')} />
        <DistancesTable report={r} unit={unit} />
      </section>
      <MethodNote families={data.fits} unit={unit} />
      <section className="panel flex flex-col gap-3" aria-labelledby="shared-comments-h">
        <h2 id="shared-comments-h" className="text-xl font-bold">Comments</h2>
        <CommentList comments={data.comments} onSelectPosition={setSelected} />
      </section>
    </div>
  );
}
