import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { CheckStatus } from '@/components/check-status/CheckStatus';
import { getBed } from '@/db/queries/beds';
import { getCheckStatus } from '@/lib/checks/api';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { orNotFound } from '@/lib/http/not-found';

export const metadata: Metadata = { title: 'Check' };

export default async function CheckPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const db = await getDb();
  const view = await orNotFound(getCheckStatus(db, actor, id));
  const bed = await getBed(db, actor.workshopId, view.bedId);
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p><Link href={`/beds/${view.bedId}`} className="underline">← {bed?.name ?? 'The bed'}</Link></p>
        <h1 className="text-3xl font-bold">Check of {bed?.name ?? 'the bed'}</h1>
        <CheckStatus checkId={id} initial={{ ...view, error: view.error ?? undefined }} canUpload={can(actor, 'photo:upload')} canReview={can(actor, 'check:review')} />
      </div>
    </AppShell>
  );
}
