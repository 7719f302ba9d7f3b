import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { AcceptInvite } from '@/components/AcceptInvite';
import { Brand } from '@/components/AppShell';
import { currentAuth } from '@/lib/auth/session';
import { describeInvitation } from '@/lib/services/members';

export const metadata: Metadata = { title: 'Invitation', referrer: 'no-referrer' };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const [inv, auth] = await Promise.all([describeInvitation(await getDb(), token), currentAuth()]);
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <Brand />
      <h1 className="text-3xl font-bold">Invitation</h1>
      {!inv ? (
        <p className="panel">This link is not valid any more: it was used, revoked, or it expired. Ask the workshop owner for a new one.</p>
      ) : auth && auth.user.email !== inv.email ? (
        <p className="panel">This invitation is for <strong>{inv.email}</strong>, but you are signed in as {auth.user.email}. <Link href="/sign-out" className="underline">Sign out</Link> and open the link again.</p>
      ) : !auth && inv.hasAccount ? (
        <p className="panel">You have an account as <strong>{inv.email}</strong>. <Link href="/sign-in" className="font-bold underline">Sign in</Link>, then open this link again to join {inv.workshopName}.</p>
      ) : (
        <>
          <p>Join <strong>{inv.workshopName}</strong> as <strong className="capitalize">{inv.role}</strong> with <strong>{inv.email}</strong>.</p>
          <AcceptInvite token={token} needsAccount={!auth} />
        </>
      )}
    </div>
  );
}
