import type { Metadata } from 'next';
import Link from 'next/link';
import { Brand } from '@/components/AppShell';
import { SignOutButton } from '@/components/SignOutButton';
import { currentAuth } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Sign out' };

export default async function SignOutPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const auth = await currentAuth();
  const sp = await searchParams;
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <Brand />
      <h1 className="text-3xl font-bold">Sign out</h1>
      {sp.error && <p role="alert" className="field-error">Signing out did not work ({sp.error}). Try again.</p>}
      {auth ? (
        <div className="panel flex flex-col gap-4">
          <p>Signed in as <strong>{auth.user.name}</strong> ({auth.user.email}). Signing out ends this session on the server too.</p>
          <SignOutButton className="btn" />
          <Link href="/" className="btn btn-quiet">Back to the beds</Link>
        </div>
      ) : (
        <p className="panel">You are not signed in. <Link href="/sign-in" className="font-bold underline">Sign in</Link></p>
      )}
    </div>
  );
}
