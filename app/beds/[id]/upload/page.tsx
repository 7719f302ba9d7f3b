import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { UploadForm } from '@/components/upload/UploadForm';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { getBed, listBeds, type PatternSummary } from '@/lib/services/beds';
import type { BedSize } from '@/components/upload/photo-checks';
import { uploadMaxBytes } from '@/lib/storage';
import { orNotFound } from '@/lib/http/not-found';

export const metadata: Metadata = { title: 'Upload a photo' };

/** The bed's outline and smallest hole in mm, for the browser's check of a photo's size. */
function bedSize(p: PatternSummary): BedSize {
  const k = p.units === 'in' ? 25.4 : 1;
  return { widthMm: p.bed.width * k, heightMm: p.bed.height * k, smallestHoleMm: Math.min(...p.families.map((f) => f.holeDiameter)) * k };
}

export default async function UploadPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const db = await getDb();
  const bed = (await orNotFound(getBed(db, actor, id))).bed;
  const beds = (await listBeds(db, actor)).map((b) => ({ id: b.id, name: b.name, hasPattern: b.pattern !== null, ...(b.pattern ? { size: bedSize(b.pattern) } : {}) }));
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <p><Link href={`/beds/${id}`} className="underline">← {bed.name}</Link></p>
        <h1 className="text-3xl font-bold">Check {bed.name} from a photo</h1>
        {can(actor, 'photo:upload') ? (
          <UploadForm beds={beds} bedId={id} userUnits={actor.user.units} maxBytes={uploadMaxBytes()} />
        ) : (
          <p className="panel">Your role in this workshop reads reports; an owner or a machinist uploads photos.</p>
        )}
      </div>
    </AppShell>
  );
}
