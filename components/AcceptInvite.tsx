'use client';
/** Accepts an invitation (POST /api/invitations/accept): with the signed-in account, or a new one. */
import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { api, errorText, fieldError } from './api';

export function AcceptInvite({ token, needsAccount }: { token: string; needsAccount: boolean }) {
  const router = useRouter();
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const m = useMutation({
    mutationFn: () => api('/api/invitations/accept', { body: needsAccount ? { token, name, password } : { token } }),
    onSuccess: () => {
      router.replace('/');
      router.refresh();
    },
  });
  return (
    <form className="panel flex flex-col gap-4" onSubmit={(e) => { e.preventDefault(); m.mutate(); }}>
      {needsAccount && (
        <>
          <label className="field"><span>Your name</span><input className="input" value={name} onChange={(e) => setName(e.target.value)} autoComplete="name" required />
            {fieldError(m.error, 'name') && <small className="field-error">{fieldError(m.error, 'name')}</small>}</label>
          <label className="field"><span>Choose a password</span><input className="input" type="password" value={password} onChange={(e) => setPassword(e.target.value)} autoComplete="new-password" required />
            <small className="text-muted">At least 10 characters.</small>
            {fieldError(m.error, 'password') && <small className="field-error">{fieldError(m.error, 'password')}</small>}</label>
        </>
      )}
      {m.isError && <p role="alert" className="field-error">{errorText(m.error)}</p>}
      <button className="btn self-start" type="submit" disabled={m.isPending}>Join the workshop</button>
    </form>
  );
}
