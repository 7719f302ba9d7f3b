import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { AppShell } from '@/components/AppShell';
import { MembersBoard } from '@/components/MembersBoard';
import { requireActor } from '@/lib/auth/session';
import { can } from '@/lib/services/actor';
import { listMembers } from '@/lib/services/members';

export const metadata: Metadata = { title: 'Members' };

export default async function MembersPage() {
  const { actor, auth } = await requireActor();
  const data = await listMembers(await getDb(), actor);
  return (
    <AppShell auth={auth}>
      <div className="flex flex-col gap-6">
        <h1 className="text-3xl font-bold">Members</h1>
        <MembersBoard initial={data} isOwner={can(actor, 'members:manage')} meId={actor.user.id} />
      </div>
    </AppShell>
  );
}
