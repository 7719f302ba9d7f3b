import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { BedsBoard } from '@/components/BedsBoard';
import { SafetyNote } from '@/components/SafetyNote';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { listBeds } from '@/lib/services/beds';
import { listPresets } from '@/lib/services/presets';

export default async function DashboardPage() {
  const { actor, auth } = await requireActor();
  const beds = await listBeds(await getDb(), actor);
  const workshop = auth.workshops.find((w) => w.workshopId === actor.workshopId);
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <h1 className="text-3xl font-bold">{workshop?.name ?? 'Workshop'}: beds</h1>
        <BedsBoard initialBeds={beds} canCreate={can(actor, 'bed:write')} presets={listPresets().map(({ id, name, description }) => ({ id, name, description }))} />
        <SafetyNote />
      </div>
    </AppShell>
  );
}
