import { redirect } from 'next/navigation';
import { Brand } from '@/components/AppShell';
import { SignOutButton } from '@/components/SignOutButton';
import { currentAuth } from '@/lib/auth/session';

export default async function NoWorkshopPage() {
  const auth = await currentAuth();
  if (!auth) redirect('/sign-in');
  if (auth.actor) redirect('/');
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <Brand />
      <h1 className="text-3xl font-bold">No workshop</h1>
      <p className="panel">You are signed in as {auth.user.email} but belong to no workshop any more. Ask an owner for an invitation link.</p>
      <SignOutButton />
    </div>
  );
}
