import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { ReviewEditor } from '@/components/review/ReviewEditor';
import { requireActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Review' };

/** Review a check's detections over its photo and re-fit. */
export default async function ReviewPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { auth } = await requireActor();
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-4">
        <p><Link href={`/checks/${id}/report`} className="underline">← The report</Link></p>
        <h1 className="text-3xl font-bold">Review the detections</h1>
        <p className="text-muted">Work on the photo only; never reach onto the bed while the machine can move.</p>
        <ReviewEditor checkId={id} />
      </div>
    </AppShell>
  );
}
