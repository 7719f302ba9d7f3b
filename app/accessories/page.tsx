import type { Metadata } from 'next';
import { AppShell } from '@/components/AppShell';
import { AccessoryLibrary, type BedPitch } from '@/components/accessories/AccessoryLibrary';
import { getDb } from '@/db/client';
import { listBeds } from '@/db/queries/beds';
import { PatternSchema } from '@/lib/geometry/contract';
import { patternToMm } from '@/lib/geometry/units';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';

export const metadata: Metadata = { title: 'Accessories' };

/** The workshop's accessory library: fences, stops, clamp bases, dogs and boards, and their pins. */
export default async function AccessoriesPage() {
  const { actor, auth } = await requireActor();
  const beds = await listBeds(await getDb(), actor.workshopId);
  const pitches: BedPitch[] = [];
  for (const b of beds) {
    const parsed = b.patternJson ? PatternSchema.safeParse(JSON.parse(b.patternJson)) : null;
    const f = parsed?.success ? patternToMm(parsed.data).families[0] : undefined;
    if (f) pitches.push({ name: b.name, pitchXMm: Number(f.pitch.x.toFixed(4)), pitchYMm: Number(f.pitch.y.toFixed(4)) });
  }
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <h1 className="text-3xl font-bold">Accessories</h1>
        <p className="max-w-3xl">Fences, stops, clamp bases, dogs and sacrificial boards the workshop puts on its beds. On any finished check, test where each one fits and where it binds.</p>
        <AccessoryLibrary canEdit={can(actor, 'accessory:write')} bedPitches={pitches} />
      </div>
    </AppShell>
  );
}
