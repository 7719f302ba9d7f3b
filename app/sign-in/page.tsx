import type { Metadata } from 'next';
import { headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { Brand } from '@/components/AppShell';
import { SignInForm } from '@/components/AuthForms';
import { SafetyNote } from '@/components/SafetyNote';
import { InsecureOriginNote } from '@/components/InsecureOriginNote';
import { ThemeToggle } from '@/components/ThemeToggle';
import { cookieIsSecure, currentAuth } from '@/lib/auth/session';
import { isDemoMode } from '@/lib/auth/secret';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  if (await currentAuth()) redirect('/');
  const sp = await searchParams;
  const demo = isDemoMode() ? { logins: DEMO_LOGINS.map(({ email, name, who }) => ({ email, name, who })), password: DEMO_PASSWORD } : null;
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <div className="flex items-center justify-between"><Brand /><ThemeToggle /></div>
      <h1 className="text-3xl font-bold">Sign in</h1>
      <p className="text-muted">Check your fixture bed from one photo: where every insert and dog hole really is, and which panel to move.</p>
      {sp['signed-out'] && <p role="status" className="panel">You are signed out.</p>}
      <InsecureOriginNote cookieSecure={cookieIsSecure({ headers: await headers() })} />
      <SignInForm demo={demo} />
      <SafetyNote />
    </div>
  );
}
