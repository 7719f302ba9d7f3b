import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { Brand } from '@/components/AppShell';
import { SignUpForm } from '@/components/AuthForms';
import { ThemeToggle } from '@/components/ThemeToggle';
import { currentAuth } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Create a workshop' };

export default async function SignUpPage() {
  if (await currentAuth()) redirect('/');
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <div className="flex items-center justify-between"><Brand /><ThemeToggle /></div>
      <h1 className="text-3xl font-bold">Create a workshop</h1>
      <p className="text-muted">One account per person. Your workshop holds your beds and their checks; invite machinists and reviewers later.</p>
      <SignUpForm />
    </div>
  );
}
