import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AppShell } from '@/components/AppShell';
import { CommentsPanel } from '@/components/comments/Comments';
import { SharePanel } from '@/components/share/SharePanel';
import { getDb } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/http/errors';
import { can } from '@/lib/services/actor';
import { loadFinishedCheck, type FinishedCheck } from '@/lib/services/share-report';

export const metadata: Metadata = { title: 'Share and discuss' };

/** Comments on a finished check, and (owners, machinists) its share links and "send to a helper". */
export default async function SharePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  let fc: FinishedCheck;
  try {
    fc = await loadFinishedCheck(await getDb(), actor.workshopId, id);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    if (e instanceof AppError && e.status === 409) {
      return <AppShell auth={auth}><p className="panel">This check has no report yet; it can be shared once it is done. <Link className="underline" href={`/checks/${id}`}>Back to the check</Link></p></AppShell>;
    }
    throw e;
  }
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p className="no-print"><Link href={`/checks/${id}/report`} className="underline">← The report of {fc.bedName}</Link></p>
        <h1 className="text-3xl font-bold">Share and discuss: {fc.bedName}{fc.check.title ? ` · ${fc.check.title}` : ''}</h1>
        <p><a className="btn btn-quiet" href={`/api/checks/${id}/report.pdf?units=${actor.user.units}`} download>Report as PDF</a> <Link className="btn btn-quiet" href={`/checks/${id}/fit`}>Try an accessory</Link></p>
        <CommentsPanel checkId={id} meId={actor.user.id} isOwner={actor.role === 'owner'} canComment={can(actor, 'comment:write')} positionLabels={fc.report.positions.map((p) => p.label)} />
        {can(actor, 'share:manage') ? <SharePanel checkId={id} /> : <p className="text-muted">Owners and machinists can share this report outside the workshop.</p>}
      </div>
    </AppShell>
  );
}
