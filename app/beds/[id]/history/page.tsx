import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { BedHistory } from '@/components/history/BedHistory';
import { requireActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Bed history' };

/** A bed's checks over time and their trend; pick two to compare. */
export default async function BedHistoryPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { auth, actor } = await requireActor();
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-4">
        <p><Link href={`/beds/${id}`} className="underline">← The bed</Link></p>
        <h1 className="text-3xl font-bold">History</h1>
        <BedHistory bedId={id} unit={actor.user.units} />
      </div>
    </AppShell>
  );
}
