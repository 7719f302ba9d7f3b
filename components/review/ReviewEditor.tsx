'use client';
/**
 * Review of one check's detections over its photo (image px, origin top-left, +y down): the reference
 * square's corners (drag to move), every detection marked by the verdict of its matched position, the
 * unmatched ones, and the expected places not seen. The user adds a missed hole, removes a false one, then
 * re-fits without a new upload (`POST /api/checks/{id}/refit`); the server records what was edited and by whom.
 */
import '@/components/report/report.css';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useMemo, useRef, useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, errorText } from '@/components/api';
import { useCheckDetail } from '@/components/report/CheckReport';
import { MarkChip } from '@/components/report/Mark';
import { PhotoMarks, type PhotoMark } from '@/components/report/PhotoMarks';
import type { Points, Report } from '@/lib/geometry/contract';
import { photoOverlay } from '@/lib/report/overlay';
import { MARK_WORD } from '@/lib/report/words';
import { ZoomStage, type StageApi } from './ZoomStage';
import { formatUtc } from '@/lib/dates';

type Corner = [number, number];
interface Hole { id: string; x: number; y: number; diameterPx: number; confidence?: number; added: boolean; removed: boolean }
interface Draft { corners: [Corner, Corner, Corner, Corner]; holes: Hole[] }
type Mode = 'move' | 'add' | 'remove';

const MODES: { id: Mode; label: string; help: string }[] = [
  { id: 'move', label: 'Move', help: 'Drag a yellow corner onto the square’s corner. Drag elsewhere to look around.' },
  { id: 'add', label: 'Add hole', help: 'Tap the centre of a hole that was missed.' },
  { id: 'remove', label: 'Remove', help: 'Tap a mark that is not a hole (a chip, a screw head). Tap again to keep it.' },
];

function draftFrom(p: Points): Draft {
  return {
    corners: p.reference.corners.map((c) => [c[0], c[1]] as Corner) as Draft['corners'],
    holes: p.holes.map((h, i) => ({ id: `d${i}`, x: h.x, y: h.y, diameterPx: h.diameterPx, confidence: h.confidence, added: false, removed: false })),
  };
}

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s.length ? s[Math.floor(s.length / 2)]! : 20; };
const round2 = (v: number) => Math.round(v * 100) / 100;

export function ReviewEditor({ checkId }: { checkId: string }) {
  const detail = useCheckDetail(checkId);
  const report = useQuery({ queryKey: ['check-report', checkId], queryFn: () => api<Report>(`/api/checks/${checkId}/report`), retry: false });
  if (detail.isPending) return <p className="panel" aria-busy="true">Loading the photo and detections…</p>;
  if (detail.isError) return <p className="panel field-error" role="alert">{errorText(detail.error)}</p>;
  const d = detail.data;
  if (!d.detections) return <p className="panel">There is nothing to review yet: the photo has not been analysed ({d.check.status}). {d.check.error ?? ''}</p>;
  return <Editor key={`${d.check.edited?.at ?? 0}-${d.check.finishedAt ?? 0}`} checkId={checkId} points={d.detections} report={report.data ?? null} canReview={d.can.review} photo={d.photo.available} edited={d.check.edited} />;
}

function Editor({ checkId, points, report, canReview, photo, edited }: { checkId: string; points: Points; report: Report | null; canReview: boolean; photo: boolean; edited: { byName: string | null; at: number } | null }) {
  const router = useRouter();
  const qc = useQueryClient();
  const original = useMemo(() => draftFrom(points), [points]);
  const [draft, setDraft] = useState<Draft>(original);
  const [history, setHistory] = useState<Draft[]>([]);
  const [mode, setMode] = useState<Mode>('move');
  const [status, setStatus] = useState<string | null>(null);
  const drag = useRef<{ corner: number; pointer: number } | null>(null);
  const addedCount = useRef(0);
  const overlay = useMemo(() => (report ? photoOverlay(report, points) : null), [report, points]);
  const typicalD = useMemo(() => median(points.holes.map((h) => h.diameterPx)), [points]);

  const change = (next: Draft) => { setHistory((h) => [...h.slice(-49), draft]); setDraft(next); };
  const undo = () => { const prev = history[history.length - 1]; if (prev) { setDraft(prev); setHistory((h) => h.slice(0, -1)); } };

  const edits = useMemo(() => {
    const moved = draft.corners.flatMap((c, i) => {
      const o = original.corners[i]!;
      return Math.hypot(c[0] - o[0], c[1] - o[1]) > 0.01 ? [{ corner: i, from: o, to: [round2(c[0]), round2(c[1])] }] : [];
    });
    const added = draft.holes.filter((h) => h.added && !h.removed).map((h) => ({ x: round2(h.x), y: round2(h.y), diameterPx: round2(h.diameterPx) }));
    const removed = draft.holes.filter((h) => !h.added && h.removed).map((h) => ({ x: h.x, y: h.y, diameterPx: h.diameterPx }));
    return { movedCorners: moved, addedHoles: added, removedHoles: removed };
  }, [draft, original]);
  const nEdits = edits.movedCorners.length + edits.addedHoles.length + edits.removedHoles.length;

  const refit = useMutation({
    mutationFn: async () => {
      const detections: Points = {
        ...points,
        // Corners placed by hand are not the detector's: its stated corner precision no longer applies to them.
        reference: edits.movedCorners.length ? { sizeMm: points.reference.sizeMm, corners: draft.corners } : { ...points.reference, corners: draft.corners },
        holes: draft.holes.filter((h) => !h.removed).map((h) => ({ x: h.x, y: h.y, diameterPx: h.diameterPx, ...(h.confidence !== undefined ? { confidence: h.confidence } : {}) })),
      };
      await api(`/api/checks/${checkId}/refit`, { body: { detections, edits: { ...edits, tool: 'review', version: 1 } } });
      setStatus('Queued for a re-fit…');
      for (let i = 0; i < 240; i++) {
        await new Promise((r) => setTimeout(r, 500));
        const s = await api<{ check: { status: string; stage: string | null; progress: number; error?: string } }>(`/api/checks/${checkId}`);
        if (s.check.status === 'done' || s.check.status === 'needs-review') return s.check;
        if (s.check.status === 'failed') throw new Error(s.check.error ?? 'The re-fit failed.');
        setStatus(`${s.check.stage ?? s.check.status} · ${Math.round(s.check.progress * 100)} %`);
      }
      throw new Error('The re-fit is taking long; look again in a minute.');
    },
    onSuccess: async (c) => {
      setStatus(c.status === 'needs-review' ? `Re-fitted, but it still needs a look: ${c.stage ?? ''}` : 'Re-fitted.');
      await qc.invalidateQueries({ queryKey: ['check-report', checkId] });
      await qc.invalidateQueries({ queryKey: ['check-detail', checkId] });
      if (c.status === 'done') router.push(`/checks/${checkId}/report`);
    },
    onError: () => setStatus(null),
  });

  const nearestHole = (p: { x: number; y: number }, api: StageApi) => {
    const gate = 24 * api.pxPerScreen;
    let best: Hole | null = null, bd = Infinity;
    for (const h of draft.holes) {
      const dd = Math.hypot(h.x - p.x, h.y - p.y);
      if (dd < Math.max(gate, h.diameterPx / 2) && dd < bd) { bd = dd; best = h; }
    }
    return best;
  };
  const onTap = (p: { x: number; y: number }, stage: StageApi) => {
    if (!canReview) return;
    if (mode === 'add') {
      addedCount.current += 1;
      change({ ...draft, holes: [...draft.holes, { id: `a${addedCount.current}-${Date.now()}`, x: p.x, y: p.y, diameterPx: typicalD, added: true, removed: false }] });
    } else if (mode === 'remove') {
      const h = nearestHole(p, stage);
      if (!h) return;
      change({ ...draft, holes: h.added ? draft.holes.filter((q) => q.id !== h.id) : draft.holes.map((q) => (q.id === h.id ? { ...q, removed: !q.removed } : q)) });
    }
  };

  const marks: PhotoMark[] = draft.holes.filter((h) => !h.removed).map((h) => {
    const i = h.added ? -1 : Number(h.id.slice(1));
    const pos = overlay && i >= 0 ? overlay.detectionPosition[i]! : -1;
    const p = pos >= 0 && report ? report.positions[pos]! : null;
    const mark = h.added ? 'unmatched' : overlay && i >= 0 ? overlay.detectionVerdict[i]! : 'in';
    return { key: h.id, x: h.x, y: h.y, diameterPx: h.diameterPx, mark, title: h.added ? 'added by you' : p ? `${p.label} — ${MARK_WORD[p.verdict]}` : 'matches no position' };
  });
  if (overlay && report) report.positions.forEach((p, i) => {
    const px = overlay.positionPx[i];
    if (!p.measured && !p.hidden && px) marks.push({ key: `m${i}`, x: px.x, y: px.y, mark: 'missing', title: `${p.label}: expected here, ${MARK_WORD.missing.toLowerCase()}` });
  });
  const removed = draft.holes.filter((h) => h.removed);
  const added = draft.holes.filter((h) => h.added);

  return (
    <div className="flex flex-col gap-4" data-testid="review-editor">
      {edited && <p className="text-muted">Last edited by {edited.byName ?? 'a former member'} on {formatUtc(edited.at)}.</p>}
      {!canReview && <p className="panel">Your role can look but not edit; a machinist or the owner can re-fit.</p>}
      <div className="flex flex-wrap gap-x-4 gap-y-1">
        {(['out', 'marginal', 'in', 'missing', 'unmatched'] as const).map((m) => <MarkChip key={m} mark={m} />)}
        <span className="text-sm text-muted">violet plus: unmatched or added by you · dashed yellow: the reference square</span>
      </div>
      {canReview && (
        <div className="flex flex-col gap-2">
          <div className="flex flex-wrap gap-2" role="radiogroup" aria-label="What a tap does">
            {MODES.map((m) => (
              <button key={m.id} type="button" role="radio" aria-checked={mode === m.id} className={`btn ${mode === m.id ? '' : 'btn-quiet'}`} onClick={() => setMode(m.id)} data-testid={`mode-${m.id}`}>{m.label}</button>
            ))}
            <button type="button" className="btn btn-quiet" onClick={undo} disabled={history.length === 0}>Undo</button>
            <button type="button" className="btn btn-quiet" onClick={() => change(original)} disabled={nEdits === 0}>Start over</button>
          </div>
          <p className="text-sm">{MODES.find((m) => m.id === mode)!.help}</p>
        </div>
      )}
      <ZoomStage widthPx={points.image.width} heightPx={points.image.height} href={photo ? `/api/checks/${checkId}/photo?size=3200` : null} onTap={onTap} label="The photo with the detections to review">
        {(a) => {
          const r = 16 * a.pxPerScreen;
          return (
            <g>
              <PhotoMarks corners={draft.corners} marks={marks} pxPerScreen={a.pxPerScreen} />
              {removed.map((h) => (
                <g key={h.id} data-removed="true">
                  <title>removed by you</title>
                  <path d={`M ${h.x - r / 2} ${h.y - r / 2} L ${h.x + r / 2} ${h.y + r / 2} M ${h.x + r / 2} ${h.y - r / 2} L ${h.x - r / 2} ${h.y + r / 2}`} stroke="#fff" strokeOpacity={0.8} strokeWidth={3 * a.pxPerScreen} />
                </g>
              ))}
              {draft.corners.map((c, i) => (
                <g key={i}>
                  <circle
                    data-drag="corner"
                    data-testid={`corner-${i}`}
                    cx={c[0]} cy={c[1]} r={r}
                    fill="#ffd23f" fillOpacity={0.35} stroke="#ffd23f" strokeWidth={3 * a.pxPerScreen}
                    style={{ cursor: canReview ? 'grab' : 'default', touchAction: 'none' }}
                    onPointerDown={(e) => {
                      if (!canReview || mode !== 'move') return;
                      e.stopPropagation();
                      (e.target as Element).setPointerCapture(e.pointerId);
                      drag.current = { corner: i, pointer: e.pointerId };
                      setHistory((h) => [...h.slice(-49), draft]);
                    }}
                    onPointerMove={(e) => {
                      if (drag.current?.pointer !== e.pointerId) return;
                      const p = a.toImage(e.clientX, e.clientY);
                      setDraft((dr) => ({ ...dr, corners: dr.corners.map((q, k) => (k === drag.current!.corner ? [p.x, p.y] : q)) as Draft['corners'] }));
                    }}
                    onPointerUp={() => { drag.current = null; }}
                    onPointerCancel={() => { drag.current = null; }}
                  />
                  <circle cx={c[0]} cy={c[1]} r={2 * a.pxPerScreen} fill="#000" pointerEvents="none" />
                </g>
              ))}
            </g>
          );
        }}
      </ZoomStage>
      <section className="panel flex flex-col gap-3" aria-label="Your edits">
        <h2 className="text-xl font-bold">Your edits</h2>
        <p data-testid="edit-summary">{edits.movedCorners.length} corner{edits.movedCorners.length === 1 ? '' : 's'} moved · {added.length} hole{added.length === 1 ? '' : 's'} added · {removed.length} removed · {draft.holes.filter((h) => !h.removed).length} holes will be fitted.</p>
        {canReview && (
          <div className="flex flex-wrap items-center gap-3">
            <button type="button" className="btn" disabled={nEdits === 0 || refit.isPending} onClick={() => refit.mutate()} data-testid="refit">{refit.isPending ? 'Re-fitting…' : 'Re-fit with these edits'}</button>
            <Link href={`/checks/${checkId}/report`} className="btn btn-quiet">Back to the report</Link>
          </div>
        )}
        {status && <p aria-live="polite" data-testid="refit-status">{status}</p>}
        {refit.isError && <p className="field-error" role="alert">{errorText(refit.error)}</p>}
      </section>
    </div>
  );
}
