import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { CheckReport } from '@/components/report/CheckReport';
import { requireActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Report' };

/** The report of one check on its own page (printable); the data comes through the API. */
export default async function ReportPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { auth } = await requireActor();
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-4">
        <p className="no-print"><Link href={`/checks/${id}`} className="underline">← The check</Link></p>
        <h1 className="text-3xl font-bold">Report</h1>
        <CheckReport checkId={id} />
      </div>
    </AppShell>
  );
}
