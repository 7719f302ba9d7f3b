import type { Metadata } from 'next';
import { AppShell } from '@/components/AppShell';
import { CompareView } from '@/components/history/CompareView';
import { requireActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Compare checks' };

/** What changed between two checks of one bed (a before, b after). */
export default async function ComparePage({ params }: { params: Promise<{ a: string; b: string }> }) {
  const { a, b } = await params;
  const { auth, actor } = await requireActor();
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-4">
        <h1 className="text-3xl font-bold">What changed</h1>
        <CompareView a={a} b={b} unit={actor.user.units} />
      </div>
    </AppShell>
  );
}
