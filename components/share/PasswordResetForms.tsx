'use client';
/** Asking for a password reset link, and choosing the new password from it (POST /api/auth/password-reset…). */
import { useMutation } from '@tanstack/react-query';
import Link from 'next/link';
import { useState } from 'react';
import { api, errorText, fieldError } from '@/components/api';

export function ForgotPasswordForm() {
  const [email, setEmail] = useState('');
  const m = useMutation({ mutationFn: () => api('/api/auth/password-reset', { body: { email } }) });
  if (m.isSuccess) {
    return <p className="panel" role="status" data-testid="reset-asked">If an account uses <strong>{email}</strong>, a link to choose a new password is on its way. It works once, for one hour.</p>;
  }
  return (
    <form className="panel flex flex-col gap-4" onSubmit={(e) => { e.preventDefault(); m.mutate(); }} aria-label="Ask for a reset link">
      <label className="field"><span>E-mail</span><input className="input" type="email" value={email} onChange={(e) => setEmail(e.target.value)} autoComplete="email" required />
        {fieldError(m.error, 'email') && <small className="field-error">{fieldError(m.error, 'email')}</small>}</label>
      {m.isError && !fieldError(m.error, 'email') && <p role="alert" className="field-error">{errorText(m.error)}</p>}
      <button className="btn self-start" type="submit" disabled={m.isPending}>Send me a link</button>
    </form>
  );
}

export function ResetPasswordForm({ token }: { token: string }) {
  const [password, setPassword] = useState('');
  const [again, setAgain] = useState('');
  const m = useMutation({ mutationFn: () => api('/api/auth/password-reset/confirm', { body: { token, password } }) });
  if (m.isSuccess) {
    return <p className="panel" role="status" data-testid="reset-done">Your password is changed and every other session is signed out. <Link className="font-bold underline" href="/sign-in">Sign in</Link> with the new one.</p>;
  }
  const mismatch = again !== '' && again !== password;
  return (
    <form className="panel flex flex-col gap-4" onSubmit={(e) => { e.preventDefault(); if (!mismatch) m.mutate(); }} aria-label="Choose a new password">
      <label className="field"><span>New password</span><input className="input" type="password" value={password} onChange={(e) => setPassword(e.target.value)} autoComplete="new-password" required />
        <small className="text-muted">At least 10 characters.</small>
        {fieldError(m.error, 'password') && <small className="field-error">{fieldError(m.error, 'password')}</small>}</label>
      <label className="field"><span>Once more</span><input className="input" type="password" value={again} onChange={(e) => setAgain(e.target.value)} autoComplete="new-password" required />
        {mismatch && <small className="field-error">The two do not match.</small>}</label>
      {m.isError && !fieldError(m.error, 'password') && <p role="alert" className="field-error">{errorText(m.error)}</p>}
      <button className="btn self-start" type="submit" disabled={m.isPending || mismatch}>Change the password</button>
    </form>
  );
}
