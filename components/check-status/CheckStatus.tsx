'use client';
/**
 * Follows one check through GET /api/checks/{id} with TanStack Query, polling until it is done, needs review
 * or failed: a progress bar and the stage while it runs, the report when it is done (components/report), and
 * when it failed, why and what to try (another photo; mark the square's corners by hand in review).
 */
import Link from 'next/link';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { api, errorText } from '@/components/api';
import { CheckReport } from '@/components/report/CheckReport';
import { PhotoQualityVerdict } from './PhotoQualityVerdict';
import { failureAdvice, isSettled, pollInterval, progressPercent, stageWords, type CheckStatusView } from './stages';

export function CheckStatus({ checkId, initial, canUpload, canReview }: { checkId: string; initial: CheckStatusView; canUpload: boolean; canReview: boolean }) {
  const polls = useRef(0);
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: ['check-status', checkId],
    queryFn: async () => {
      polls.current++;
      return (await api<{ check: CheckStatusView }>(`/api/checks/${checkId}`)).check;
    },
    initialData: initial,
    initialDataUpdatedAt: 0,
    refetchInterval: (query) => pollInterval(query.state.data, polls.current),
    refetchIntervalInBackground: false,
    retry: 3,
  });
  const view = q.data;
  const settled = isSettled(view.status);
  const wasSettled = useRef(isSettled(initial.status));
  useEffect(() => {
    // When the check settles while we watch, the report's own queries must load afresh.
    if (settled && !wasSettled.current) {
      wasSettled.current = true;
      void qc.invalidateQueries({ queryKey: ['check-report', checkId] });
      void qc.invalidateQueries({ queryKey: ['check-detail', checkId] });
    }
  }, [settled, qc, checkId]);

  const pct = progressPercent(view);
  const words = stageWords(view);

  if (view.status === 'done' || view.status === 'needs-review') {
    return (
      <div className="flex flex-col gap-4" data-testid="check-settled" data-status={view.status}>
        {view.status === 'needs-review' && (
          <div className="panel flex flex-col gap-2 border-2 border-warn bg-warn-bg text-warn" role="status">
            <p className="text-lg font-bold">Look at this one before you trust it.</p>
            {view.stage && <p>{view.stage}</p>}
            {canReview && <Link href={`/checks/${checkId}/review`} className="btn self-start">Review the detections</Link>}
          </div>
        )}
        {view.quality && <PhotoQualityVerdict quality={view.quality} phase="settled" uploadHref={canUpload ? `/beds/${view.bedId}/upload` : undefined} />}
        <CheckReport checkId={checkId} />
        <p className="flex flex-wrap gap-3 text-sm">
          <a className="underline" href={`/api/checks/${checkId}/report`}>Report as JSON</a>
          {canReview && <Link className="underline" href={`/checks/${checkId}/review`}>Review and re-fit</Link>}
        </p>
      </div>
    );
  }

  if (view.status === 'failed') {
    const advice = failureAdvice(view.error, view.hasDetections);
    return (
      <section className="panel flex flex-col gap-4 border-2 border-fail" role="alert" data-testid="check-failed">
        <h2 className="text-2xl font-bold text-fail">{words}</h2>
        <p className="text-lg">{view.error ?? 'The worker gave no reason.'}</p>
        {view.quality && view.quality.issues.length > 0 && <PhotoQualityVerdict quality={view.quality} phase="failed" />}
        <h3 className="text-lg font-bold">What to try</h3>
        <ul className="flex flex-col gap-3">
          {advice.checkPattern && (
            <li className="flex flex-col gap-2">
              <span>Check the bed&apos;s pattern first: the holes are looked for at the sizes it gives and matched to its pitch and layout, so a wrong hole size finds none and a wrong pitch matches none.</span>
              {canUpload && <Link href={`/beds/${view.bedId}/setup`} className="btn btn-quiet self-start">Check the bed&apos;s pattern</Link>}
            </li>
          )}
          {advice.anotherPhoto && (
            <li className="flex flex-col gap-2">
              <span>Take another photo: from straight above, the whole bed and the whole square in the frame, even light, no glare on the square, chips swept off, in focus.</span>
              {canUpload && <Link href={`/beds/${view.bedId}/upload`} className="btn self-start">Upload another photo</Link>}
            </li>
          )}
          {advice.markCorners && canReview && (
            <li className="flex flex-col gap-2">
              <span>Or mark the reference square&apos;s four corners by hand on this photo and let it fit again.</span>
              <Link href={`/checks/${checkId}/review`} className="btn btn-quiet self-start">Mark the corners</Link>
            </li>
          )}
        </ul>
      </section>
    );
  }

  return (
    <section className="panel flex flex-col gap-4" aria-live="polite" data-testid="check-progress" data-status={view.status}>
      <div className="flex items-baseline justify-between gap-3">
        <h2 className="text-2xl font-bold" data-testid="check-stage">{words}</h2>
        <span className="font-mono text-xl">{pct}%</span>
      </div>
      <progress className="h-6 w-full accent-[var(--accent)]" max={100} value={view.status === 'queued' ? undefined : pct} aria-label="Measuring progress">{pct}%</progress>
      <ol className="grid grid-cols-2 gap-2 text-base sm:grid-cols-4">
        {['reading photo', 'finding square', 'finding holes', 'fitting'].map((s) => {
          const order = ['reading photo', 'finding square', 'finding holes', 'fitting'];
          const at = view.status === 'running' && view.stage ? order.indexOf(view.stage) : -1;
          const i = order.indexOf(s);
          const state = at < 0 ? 'todo' : i < at ? 'done' : i === at ? 'now' : 'todo';
          return (
            <li key={s} className={`rounded-lg border-2 px-3 py-2 ${state === 'now' ? 'border-accent font-bold' : state === 'done' ? 'border-line text-muted line-through' : 'border-line text-muted'}`}>
              {stageWords({ status: 'running', stage: s })}
            </li>
          );
        })}
      </ol>
      {view.quality && <PhotoQualityVerdict quality={view.quality} phase="running" uploadHref={canUpload ? `/beds/${view.bedId}/upload` : undefined} />}
      {q.isError && <p className="field-error">Lost touch with the server ({errorText(q.error)}); trying again.</p>}
      <p className="text-sm text-muted">You can leave this page; the check carries on and shows up on the bed&apos;s page.</p>
    </section>
  );
}
