/** A page anyone may open: inside the app's frame when signed in, with just the brand otherwise. */
import Link from 'next/link';
import type { ReactNode } from 'react';
import { AppShell, Brand } from '@/components/AppShell';
import { currentAuth } from '@/lib/auth/session';

export async function PublicFrame({ children }: { children: ReactNode }) {
  const auth = await currentAuth();
  if (auth) return <AppShell auth={auth}>{children}</AppShell>;
  return (
    <div className="mx-auto flex min-h-dvh max-w-5xl flex-col px-4">
      <header className="flex flex-wrap items-center justify-between gap-3 border-b-2 border-line py-4">
        <Brand />
        <Link href="/sign-in" className="btn btn-quiet">Sign in</Link>
      </header>
      <main className="flex-1 py-6">{children}</main>
    </div>
  );
}
