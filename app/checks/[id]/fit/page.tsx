import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AppShell } from '@/components/AppShell';
import { FitPanel, type BoardCheck, type FitAccessory } from '@/components/accessories/FitPanel';
import { getDb } from '@/db/client';
import { listBedChecks, listBeds } from '@/db/queries/beds';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/http/errors';
import { firstMeasuredOrigin, resolveFamily } from '@/lib/services/accessories-placement';
import { listAccessories } from '@/lib/services/accessories';
import { loadCheckPattern, loadFinishedCheck, type FinishedCheck } from '@/lib/services/share-report';
import { formatUtcDay } from '@/lib/dates';

export const metadata: Metadata = { title: 'Accessory fit' };

/** An accessory on a finished check: fits or binds at one placement, the map of all, a board against the bed. */
export default async function FitPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const db = await getDb();
  let fc: FinishedCheck;
  try {
    fc = await loadFinishedCheck(db, actor.workshopId, id);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    if (e instanceof AppError && e.status === 409) {
      return (
        <AppShell auth={auth}>
          <p className="panel">This check has no report yet; accessories can be tried once it is done. <Link className="underline" href={`/checks/${id}`}>Back to the check</Link></p>
        </AppShell>
      );
    }
    throw e;
  }
  const pattern = await loadCheckPattern(db, fc.check);
  const accessories: FitAccessory[] = (await listAccessories(db, actor)).map((a) => ({
    id: a.id, name: a.name, pinCount: a.spec.pins.length, firstFamily: resolveFamily(pattern, a.spec.pins[0]!.family)?.id ?? '',
    firstAt: firstMeasuredOrigin(a.spec, pattern, fc.report),
  }));
  const kindOf = new Map(pattern.families.map((f) => [f.id, f.kind]));
  const positions = fc.report.positions.map((p) => ({ label: p.label, family: p.family, kind: kindOf.get(p.family) ?? 'other', x: p.nominal.x, y: p.nominal.y }));
  const boards: BoardCheck[] = [];
  for (const b of await listBeds(db, actor.workshopId)) {
    for (const c of await listBedChecks(db, actor.workshopId, b.id, 20)) {
      if (c.id !== id && (c.status === 'done' || c.status === 'needs-review')) boards.push({ id: c.id, label: `${b.name}${c.title ? ` · ${c.title}` : ''} · ${formatUtcDay(c.finishedAt ?? c.createdAt)}` });
    }
  }
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p className="no-print"><Link href={`/checks/${id}/report`} className="underline">← The report of {fc.bedName}</Link></p>
        <h1 className="text-3xl font-bold">Accessory fit on {fc.bedName}</h1>
        <FitPanel checkId={id} accessories={accessories} positions={positions} bed={pattern.bed} boards={boards} unit={actor.user.units} />
      </div>
    </AppShell>
  );
}
