import type { Metadata } from 'next';
import Link from 'next/link';
import { AppShell } from '@/components/AppShell';
import { getDb } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { getOutboxMail } from '@/lib/services/dev-outbox';
import { orNotFound } from '@/lib/http/not-found';

export const metadata: Metadata = { title: 'Message (development)', referrer: 'no-referrer' };
export const dynamic = 'force-dynamic';

/** One message of the dev outbox: its HTML part in a sandboxed frame (no scripts) and its text part. */
export default async function OutboxMessagePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, auth } = await requireActor();
  const m = await orNotFound(getOutboxMail(await getDb(), actor, id), [404, 403]);
  const links = [...new Set(m.text.match(/https?:\/\/[^\s<>"]+/g) ?? [])];
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-4">
        <p><Link className="underline" href="/dev/outbox">← Outbox</Link></p>
        <h1 className="text-2xl font-bold">{m.subject}</h1>
        <p className="text-muted">To <span className="font-mono">{m.toAddress}</span> · {m.kind} · {m.status}</p>
        {m.html && <iframe title="The message as HTML" sandbox="" srcDoc={m.html} className="h-[36rem] w-full rounded-lg border border-line bg-white" />}
        {links.length > 0 && (
          <section className="panel" aria-label="Links in this message">
            <h2 className="text-xl font-bold">Links in this message</h2>
            <ul className="mt-2 flex flex-col gap-1">{links.map((l) => <li key={l}><a className="break-all font-mono text-sm underline" href={l} data-testid="outbox-link">{l}</a></li>)}</ul>
          </section>
        )}
        <h2 className="text-xl font-bold">Plain text</h2>
        <pre className="panel whitespace-pre-wrap wrap-anywhere font-mono text-sm" data-testid="outbox-text">{m.text}</pre>
      </div>
    </AppShell>
  );
}
