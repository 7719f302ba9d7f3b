import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { PatternEditor } from '@/components/pattern/PatternEditor';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { getBed } from '@/lib/services/beds';
import { orNotFound } from '@/lib/http/not-found';

export const metadata: Metadata = { title: 'Bed setup' };

export default async function BedSetupPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const data = await orNotFound(getBed(await getDb(), actor, id));
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p><Link href={`/beds/${id}`} className="underline">← {data.bed.name}</Link></p>
        <h1 className="text-3xl font-bold">Pattern of {data.bed.name}</h1>
        {can(actor, 'bed:write') ? (
          <PatternEditor mode="edit" bedId={id} initialName={data.bed.name} initialPattern={data.patternJson} userUnits={actor.user.units} />
        ) : (
          <p className="panel">Your role in this workshop reads beds and reports; an owner or a machinist changes a pattern.</p>
        )}
      </div>
    </AppShell>
  );
}
