import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { getDb } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { listOutbox } from '@/lib/services/dev-outbox';
import { orNotFound } from '@/lib/http/not-found';
import { formatUtc } from '@/lib/dates';

export const metadata: Metadata = { title: 'Outbox (development)' };
export const dynamic = 'force-dynamic';

/** Owners, outside production or in the demo: the mail this workshop sent, as the local mail server got it. */
export default async function OutboxPage() {
  const { actor, auth } = await requireActor();
  const rows = await orNotFound(listOutbox(await getDb(), actor), [404, 403]);
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <h1 className="text-3xl font-bold">Outbox</h1>
        <p className="text-muted">For development and the demo only: mail goes to a local mail server on this machine, not to anyone&apos;s inbox. Sent by the worker every few seconds.</p>
        {rows.length === 0 ? <p>No mail yet.</p> : (
          <div className="overflow-x-auto">
            <table className="w-full text-left" data-testid="outbox">
              <thead><tr className="border-b-2 border-line"><th className="py-2 pr-4">When</th><th className="pr-4">What</th><th className="pr-4">To</th><th className="pr-4">Subject</th><th>State</th></tr></thead>
              <tbody>
                {rows.map((m) => (
                  <tr key={m.id} className="border-b border-line align-top">
                    <td className="py-2 pr-4 whitespace-nowrap">{formatUtc(m.createdAt)}</td>
                    <td className="pr-4">{m.kind}</td>
                    <td className="pr-4 font-mono text-sm">{m.toAddress}</td>
                    <td className="pr-4"><Link className="underline" href={`/dev/outbox/${m.id}`}>{m.subject}</Link></td>
                    <td>{m.status}{m.receivedLocally ? ' · in the local inbox' : ''}{m.error ? ` · ${m.error}` : ''}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </div>
    </AppShell>
  );
}
