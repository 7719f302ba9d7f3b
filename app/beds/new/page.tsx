import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { PatternEditor } from '@/components/pattern/PatternEditor';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';

export const metadata: Metadata = { title: 'New bed' };

export default async function NewBedPage() {
  const { actor, auth } = await requireActor();
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p><Link href="/" className="underline">← All beds</Link></p>
        <h1 className="text-3xl font-bold">Set up a bed</h1>
        {can(actor, 'bed:write') ? (
          <>
            <p className="max-w-prose">Describe the bed as it was meant to be built: its size, the hole families with what goes in them, the panels or strips and any T-track. Each photo check measures the real bed against this.</p>
            <PatternEditor mode="create" userUnits={actor.user.units} />
          </>
        ) : (
          <p className="panel">Your role in this workshop reads beds and reports; an owner or a machinist sets up beds.</p>
        )}
      </div>
    </AppShell>
  );
}
