import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { BedActions } from '@/components/BedActions';
import { BedChecksTable } from '@/components/BedChecksTable';
import { SafetyNote } from '@/components/SafetyNote';
import { Verdict } from '@/components/Verdict';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { getBed } from '@/lib/services/beds';
import { orNotFound } from '@/lib/http/not-found';
import { HOLE_KIND_NAME } from '@/lib/geometry/labels';

export const metadata: Metadata = { title: 'Bed' };


export default async function BedPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const data = await orNotFound(getBed(await getDb(), actor, id));
  const { bed, checks, revisions } = data;
  const p = bed.pattern;
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p><Link href="/" className="underline">← All beds</Link></p>
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="text-3xl font-bold">{bed.name}</h1>
          <Verdict status={bed.lastCheck?.status} verdict={bed.lastCheck?.verdict} />
        </div>
        {bed.notes && <p className="text-muted">{bed.notes}</p>}
        {can(actor, 'bed:write') && (
          <div className="flex flex-wrap gap-3">
            {p && <Link href={`/beds/${bed.id}/upload`} className="btn">Check from a photo</Link>}
            <Link href={`/beds/${bed.id}/setup`} className="btn btn-quiet">{p ? 'Edit the pattern' : 'Set up the pattern'}</Link>
          </div>
        )}

        <section className="panel flex flex-col gap-3" aria-label="Pattern">
          <h2 className="text-xl font-bold">Pattern</h2>
          {p ? (
            <>
              <p>
                <strong>{p.name}</strong> — bed {p.bed.width} × {p.bed.height} {p.units}, {p.positions} positions
                {p.panels > 0 ? `, ${p.panels} panels` : ''}. Revision {bed.patternRevision}
                {bed.presetId ? ` (from preset ${bed.presetId})` : ''}.
              </p>
              <div className="overflow-x-auto">
                <table className="w-full text-left">
                  <thead>
                    <tr className="border-b-2 border-line">
                      <th className="py-2 pr-4">Family</th><th className="pr-4">Kind</th><th className="pr-4">Hole ⌀</th><th className="pr-4">Pitch X × Y</th><th className="pr-4">Grid</th><th>Fit</th>
                    </tr>
                  </thead>
                  <tbody className="font-mono text-base">
                    {p.families.map((f) => (
                      <tr key={f.id} className="border-b border-line">
                        <td className="py-2 pr-4">{f.label}</td><td className="pr-4">{HOLE_KIND_NAME[f.kind]}</td><td className="pr-4">{f.holeDiameter}</td>
                        <td className="pr-4">{f.pitch.x} × {f.pitch.y}</td><td className="pr-4">{f.count.x} × {f.count.y}</td><td>{f.fit}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              <p className="text-sm text-muted">Sizes in {p.units}. Bed frame: origin at the front-left corner, X to the right, Y away from you.</p>
            </>
          ) : (
            <p>This bed has no valid pattern; save one before checking.</p>
          )}
          {revisions.length > 1 && <p className="text-sm text-muted">{revisions.length} pattern revisions saved; checks keep the revision they were measured against.</p>}
        </section>

        <section className="panel flex flex-col gap-3" aria-label="Checks">
          <div className="flex flex-wrap items-baseline justify-between gap-3">
            <h2 className="text-xl font-bold">Checks</h2>
            {checks.length > 1 && <Link href={`/beds/${bed.id}/history`} className="btn btn-quiet">History and comparison</Link>}
          </div>
          {checks.length === 0 ? (
            <p>No checks yet. Lay the reference square on the bed with the machine off, take one photo from straight above, and upload it with “Check from a photo”.</p>
          ) : (
            <BedChecksTable checks={checks} unit={actor.user.units} />
          )}
        </section>

        <BedActions bedId={bed.id} name={bed.name} notes={bed.notes} canEdit={can(actor, 'bed:write')} canDelete={can(actor, 'bed:delete')} />
        <SafetyNote />
      </div>
    </AppShell>
  );
}
