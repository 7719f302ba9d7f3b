import type { Metadata } from 'next';
import Link from 'next/link';
import { Brand } from '@/components/AppShell';
import { ForgotPasswordForm } from '@/components/share/PasswordResetForms';

export const metadata: Metadata = { title: 'Forgot your password' };

export default function ForgotPasswordPage() {
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <Brand />
      <h1 className="text-3xl font-bold">Forgot your password?</h1>
      <p>Enter your account&apos;s e-mail address and we send you a link to choose a new password.</p>
      <ForgotPasswordForm />
      <p><Link className="underline" href="/sign-in">Back to sign in</Link></p>
    </div>
  );
}
