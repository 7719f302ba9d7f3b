import type { Metadata } from 'next';
import Link from 'next/link';
import { Brand } from '@/components/AppShell';
import { ResetPasswordForm } from '@/components/share/PasswordResetForms';
import { getDb } from '@/db/client';
import { isResetTokenLive } from '@/lib/services/password-reset';

export const metadata: Metadata = { title: 'Choose a new password', referrer: 'no-referrer' };
export const dynamic = 'force-dynamic';

export default async function ResetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const live = await isResetTokenLive(await getDb(), token);
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <Brand />
      <h1 className="text-3xl font-bold">Choose a new password</h1>
      {live ? <ResetPasswordForm token={token} /> : (
        <p className="panel">This link is not valid any more: it was used or it expired (links work for one hour). <Link className="font-bold underline" href="/forgot-password">Ask for a new one</Link>.</p>
      )}
    </div>
  );
}
