'use client';
/**
 * The report of one finished check, read through the API (`/api/checks/{id}/report` and `/detail`): the
 * verdict in one sentence, the deviation map, every position, the panels and their moves, the lattice's scale
 * and squareness, a histogram, the photo with its overlay, exports and a print sheet. All lengths arrive in mm
 * and are converted only where shown, to the user's unit.
 */
import './report.css';
import Link from 'next/link';
import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { api, errorText } from '@/components/api';
import type { Report } from '@/lib/geometry/contract';
import { photoOverlay } from '@/lib/report/overlay';
import { MARK_ORDER } from '@/lib/report/palette';
import { formatAngle, formatLength, type LengthUnit } from '@/lib/report/units';
import { mapGeometry, markRadiusMm, nearestSpacing, withOutline } from '@/lib/report/map';
import { reportArrowScale } from '@/lib/report/map-scale';
import { arrowScaleWords, hasFormView, MAP_EDGE_WORDS, MARK_WORD, positionMark, type MapView } from '@/lib/report/words';
import { reportMapItems } from '@/lib/report/map-items';
import { ZoomStage } from '@/components/review/ZoomStage';
import { CommentsPanel } from '@/components/comments/Comments';
import { BedMap } from './BedMap';
import { MapLegend } from './MapLegend';
import { DeviationHistogram } from './DeviationHistogram';
import { DistancesTable } from './DistancesTable';
import { LatticeFigures } from './LatticeFigures';
import { MarkChip } from './Mark';
import { PanelsTable } from './PanelsTable';
import { PhotoMarks, type PhotoMark } from './PhotoMarks';
import { PositionsTable, positionRows } from './PositionsTable';
import { ExaggerationSelect } from './ExaggerationSelect';
import { MapViewSwitch } from './MapViewSwitch';
import { MethodNote } from './MethodNote';
import type { CheckDetail } from '@/lib/services/check-views';
import { FigureCards, VerdictBox } from './VerdictBox';
import { PhotoNote } from './PhotoNote';
import { photoNote } from '@/lib/report/photo-note';
import { fitFamilies } from '@/lib/report/method-note';
import { formatUtc } from '@/lib/dates';

/** What `/api/checks/{id}/detail` answers: the service's own type, so the two cannot drift. */
export type { CheckDetail };


export function useCheckDetail(checkId: string) {
  return useQuery({ queryKey: ['check-detail', checkId], queryFn: () => api<CheckDetail>(`/api/checks/${checkId}/detail`) });
}

export function CheckReport({ checkId }: { checkId: string }) {
  const report = useQuery({ queryKey: ['check-report', checkId], queryFn: () => api<Report>(`/api/checks/${checkId}/report`) });
  const detail = useCheckDetail(checkId);
  if (report.isPending || detail.isPending) return <p className="panel" aria-busy="true">Loading the report…</p>;
  if (report.isError) return <p className="panel field-error" role="alert">{errorText(report.error)}</p>;
  if (detail.isError) return <p className="panel field-error" role="alert">{errorText(detail.error)}</p>;
  return <ReportView report={report.data} detail={detail.data} />;
}

export function ReportView({ report: stored, detail }: { report: Report; detail: CheckDetail }) {
  const [unit, setUnit] = useState<LengthUnit>(detail.units);
  const [selected, setSelected] = useState<string | null>(null);
  const [exag, setExag] = useState<number | 'auto'>('auto');
  const [view, setView] = useState<MapView>('bed');
  const id = detail.check.id;
  // a report stored before reports carried their bed's outline takes it from the check's pattern
  const report = useMemo(() => (stored.pattern.bed ? stored : withOutline(stored, detail.pattern)), [stored, detail.pattern]);

  const geometry = useMemo(() => mapGeometry(report), [report]);
  const spacing = useMemo(() => nearestSpacing(report.positions), [report]);
  const autoX = useMemo(() => reportArrowScale(report), [report]);
  const exaggeration = exag === 'auto' ? autoX : exag;
  const panelNote = useMemo(() => new Map(report.panels.map((p) => [p.id, `${formatLength(p.dx, unit, { signed: true, suffix: false })}, ${formatLength(p.dy, unit, { signed: true })} · ${formatAngle(p.rotationDeg, { signed: true })}`])), [report, unit]);
  const formView = useMemo(() => hasFormView(report), [report]);
  const shown: MapView = formView ? view : 'bed';
  const items = useMemo(() => reportMapItems(report, shown, unit), [report, unit, shown]);
  const rows = useMemo(() => positionRows(report), [report]);
  const methodFamilies = useMemo(() => fitFamilies(detail.pattern), [detail.pattern]);
  const overlay = useMemo(() => (detail.detections ? photoOverlay(report, detail.detections) : null), [report, detail.detections]);
  const photoMarks: PhotoMark[] = useMemo(() => {
    if (!detail.detections || !overlay) return [];
    const out: PhotoMark[] = detail.detections.holes.map((h, i) => {
      const pos = overlay.detectionPosition[i]!;
      const p = pos >= 0 ? report.positions[pos]! : null;
      return { key: `d${i}`, x: h.x, y: h.y, diameterPx: h.diameterPx, mark: overlay.detectionVerdict[i]!, title: p ? `${p.label} — ${MARK_WORD[p.verdict]}${p.deviation ? `, ${formatLength(p.deviation.r, unit)} off` : ''}` : 'detected hole that matches no position' };
    });
    report.positions.forEach((p, i) => {
      const px = overlay.positionPx[i];
      if (!p.measured && px && !p.hidden) out.push({ key: `m${i}`, x: px.x, y: px.y, mark: positionMark(p), title: `${p.label}: expected here, ${MARK_WORD.missing.toLowerCase()}` });
    });
    return out;
  }, [detail.detections, overlay, report, unit]);

  const when = formatUtc(detail.check.finishedAt ?? detail.check.createdAt);
  return (
    <article className="flex flex-col gap-6" data-testid="check-report">
      <VerdictBox report={report} unit={unit} title={`${detail.check.bedName}${detail.check.title ? ` · ${detail.check.title}` : ''} · ${when}`} />
      <PhotoNote note={photoNote(report.photo?.quality)} />
      <FigureCards report={report} unit={unit} />

      {(report.warnings?.length ?? 0) > 0 && (
        <ul className="panel list-disc pl-8" aria-label="Notes">{report.warnings!.map((w) => <li key={w}>{w}</li>)}</ul>
      )}
      {detail.check.edited && (
        <p className="text-muted">Fitted after review: detections edited by {detail.check.edited.byName ?? 'a former member'} on {formatUtc(detail.check.edited.at)}.</p>
      )}

      <div className="no-print flex flex-wrap items-end gap-3">
        <fieldset className="flex gap-2" aria-label="Units">
          <legend className="sr-only">Units</legend>
          {(['mm', 'in'] as const).map((u) => (
            <button key={u} type="button" className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-pressed={unit === u} onClick={() => setUnit(u)}>{u === 'mm' ? 'mm' : 'inch'}</button>
          ))}
        </fieldset>
        <a className="btn btn-quiet" href={`/api/checks/${id}/export?format=csv&units=${unit}`} download data-testid="export-csv">Positions CSV</a>
        {report.panels.length > 0 && <a className="btn btn-quiet" href={`/api/checks/${id}/export?format=panels-csv&units=${unit}`} download data-testid="export-panels-csv">Panels CSV</a>}
        <a className="btn btn-quiet" href={`/api/checks/${id}/export?format=json`} download>JSON</a>
        <button type="button" className="btn btn-quiet" onClick={() => window.print()}>Print</button>
        {detail.can.review && <Link className="btn btn-quiet" href={`/checks/${id}/review`} data-testid="open-review">Review detections</Link>}
        <Link className="btn btn-quiet" href={`/beds/${detail.check.bedId}/history`}>Bed history</Link>
        <a className="btn btn-quiet" href={`/api/checks/${id}/report.pdf?units=${unit}`} download data-testid="export-pdf">PDF</a>
        <Link className="btn btn-quiet" href={`/checks/${id}/share`} data-testid="open-share">Share and discuss</Link>
        <Link className="btn btn-quiet" href={`/checks/${id}/fit`} data-testid="open-fit">Try an accessory</Link>
      </div>

      <section className="panel flex flex-col gap-3" aria-labelledby="map-h">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="map-h" className="text-xl font-bold">Deviation map</h2>
          <div className="no-print flex flex-wrap items-end gap-3">
            {formView && <MapViewSwitch value={shown} onChange={setView} />}
            <ExaggerationSelect value={exag} autoFactor={autoX} onChange={setExag} className="field" />
          </div>
        </div>
        <MapLegend report={report} view={shown} formView={formView} exaggeration={exaggeration} />
        <BedMap
          widthMm={geometry.widthMm} heightMm={geometry.heightMm} originX={geometry.originX} originY={geometry.originY}
          panels={geometry.panels.map((q) => ({ ...q, note: panelNote.get(q.id) }))}
          items={items} spacingMm={spacing} markRadiusMm={markRadiusMm(geometry, spacing)} exaggeration={exaggeration} unit={unit}
          selected={selected} onSelect={setSelected}
          label={`Map of ${report.positions.length} positions seen from above, ${MAP_EDGE_WORDS.orientation}; ${arrowScaleWords(exaggeration)}, each showing a position's deviation${shown === 'form' ? ' hole to hole' : ''}.`}
        />
        {selected && <p className="font-bold" aria-live="polite">{items.find((i) => i.key === selected)?.title}</p>}
      </section>

      <section className="panel flex flex-col gap-3" aria-labelledby="pos-h">
        <h2 id="pos-h" className="text-xl font-bold">Every position</h2>
        <PositionsTable rows={rows} unit={unit} selected={selected} onSelect={setSelected} />
      </section>

      <section className="panel flex flex-col gap-3" aria-labelledby="pan-h">
        <h2 id="pan-h" className="text-xl font-bold">Panels and the moves that put them back</h2>
        <PanelsTable report={report} unit={unit} />
      </section>

      <section className="panel flex flex-col gap-3" aria-labelledby="lat-h">
        <h2 id="lat-h" className="text-xl font-bold">Lattice scale and squareness</h2>
        <LatticeFigures report={report} unit={unit} bedWidthMm={detail.pattern?.bed.width ?? null} bedHeightMm={detail.pattern?.bed.height ?? null} />
        <DistancesTable report={report} unit={unit} />
      </section>

      <section className="panel flex flex-col gap-3" aria-labelledby="hist-h">
        <h2 id="hist-h" className="text-xl font-bold">How far off</h2>
        <DeviationHistogram report={report} unit={unit} />
      </section>

      <section className="panel print-break flex flex-col gap-3" aria-labelledby="photo-h">
        <h2 id="photo-h" className="text-xl font-bold">The photo, with what was found</h2>
        {detail.photo.available && detail.detections ? (
          <>
            <div className="flex flex-wrap gap-x-4 gap-y-1">{MARK_ORDER.map((m) => <MarkChip key={m} mark={m} />)}<span className="text-sm text-muted">dashed yellow: the reference square</span></div>
            <ZoomStage widthPx={detail.detections.image.width} heightPx={detail.detections.image.height} href={`/api/checks/${id}/photo`} label="The uploaded photo with each detected hole marked by its verdict">
              {({ pxPerScreen }) => <PhotoMarks corners={detail.detections!.reference.corners} marks={photoMarks} pxPerScreen={pxPerScreen} />}
            </ZoomStage>
          </>
        ) : (
          <p>The photo is not available for this check.{detail.photo.reason ? ` ${detail.photo.reason}` : ''}</p>
        )}
      </section>
      <MethodNote families={methodFamilies} unit={unit} />
      <div className="no-print">
        {/* comments on the check or one position; deleting is on the share-and-discuss page */}
        <CommentsPanel checkId={id} meId="" isOwner={false} positionLabels={report.positions.map((p) => p.label)} onSelectPosition={setSelected} />
      </div>
      <p className="print-only text-sm">Gridproof measures from a photo; it does not replace the machine maker’s checks. Machine off before you reach onto the bed.</p>
    </article>
  );
}
