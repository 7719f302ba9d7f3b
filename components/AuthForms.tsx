'use client';
/** Sign-in and sign-up forms: they post JSON to the API through TanStack Query mutations. */
import { useMutation } from '@tanstack/react-query';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent, type ReactNode } from 'react';
import { api, errorText, fieldError } from './api';

function Field({ label, name, type = 'text', autoComplete, error, value, onChange, hint }: {
  label: string; name: string; type?: string; autoComplete?: string; error?: string; value: string; onChange: (v: string) => void; hint?: ReactNode;
}) {
  const id = `f-${name}`;
  return (
    <label className="field" htmlFor={id}>
      <span>{label}</span>
      <input id={id} name={name} type={type} autoComplete={autoComplete} className="input" value={value} onChange={(e) => onChange(e.target.value)} aria-invalid={Boolean(error)} aria-describedby={error ? `${id}-err` : undefined} required />
      {hint && <small className="text-muted">{hint}</small>}
      {error && <small id={`${id}-err`} className="field-error">{error}</small>}
    </label>
  );
}

export type DemoLogin = { email: string; name: string; who: string };

export function SignInForm({ demo }: { demo: { logins: DemoLogin[]; password: string } | null }) {
  const router = useRouter();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const m = useMutation({
    mutationFn: () => api('/api/auth/sign-in', { body: { email, password } }),
    onSuccess: () => {
      router.replace('/');
      router.refresh();
    },
  });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    m.mutate();
  };
  return (
    <div className="flex flex-col gap-6">
      <form onSubmit={submit} className="panel flex flex-col gap-4" aria-label="Sign in">
        <Field label="E-mail" name="email" type="email" autoComplete="email" value={email} onChange={setEmail} error={fieldError(m.error, 'email')} />
        <Field label="Password" name="password" type="password" autoComplete="current-password" value={password} onChange={setPassword} error={fieldError(m.error, 'password')} />
        {m.isError && <p role="alert" className="field-error">{errorText(m.error)}</p>}
        <button className="btn" type="submit" disabled={m.isPending}>{m.isPending ? 'Signing in…' : 'Sign in'}</button>
        <p>New here? <Link href="/sign-up" className="font-bold underline">Create a workshop</Link> · <Link href="/forgot-password" className="underline">Forgot your password?</Link></p>
      </form>
      {demo && (
        <section className="panel" aria-label="Demo logins">
          <h2 className="text-lg font-bold">Demo logins</h2>
          <p className="text-muted">This Gridproof runs as a demo. Password for both: <code className="font-mono">{demo.password}</code></p>
          <ul className="mt-3 flex flex-col gap-2">
            {demo.logins.map((l) => (
              <li key={l.email} className="flex flex-wrap items-center justify-between gap-2">
                <span><strong>{l.name}</strong> — {l.who}<br /><code className="font-mono text-sm">{l.email}</code></span>
                <button type="button" className="btn btn-quiet" onClick={() => { setEmail(l.email); setPassword(demo.password); }}>
                  Use {l.name}
                </button>
              </li>
            ))}
          </ul>
        </section>
      )}
    </div>
  );
}

export function SignUpForm() {
  const router = useRouter();
  const [v, setV] = useState({ name: '', email: '', password: '', workshopName: '' });
  const set = (k: keyof typeof v) => (x: string) => setV((s) => ({ ...s, [k]: x }));
  const m = useMutation({
    mutationFn: () => api('/api/auth/sign-up', { body: v }),
    onSuccess: () => {
      router.replace('/');
      router.refresh();
    },
  });
  return (
    <form onSubmit={(e) => { e.preventDefault(); m.mutate(); }} className="panel flex flex-col gap-4" aria-label="Sign up">
      <Field label="Your name" name="name" autoComplete="name" value={v.name} onChange={set('name')} error={fieldError(m.error, 'name')} />
      <Field label="E-mail" name="email" type="email" autoComplete="email" value={v.email} onChange={set('email')} error={fieldError(m.error, 'email')} />
      <Field label="Password" name="password" type="password" autoComplete="new-password" value={v.password} onChange={set('password')} error={fieldError(m.error, 'password')} hint="At least 10 characters." />
      <Field label="Workshop name" name="workshopName" autoComplete="organization" value={v.workshopName} onChange={set('workshopName')} error={fieldError(m.error, 'workshopName')} hint="You will be its owner and can invite the others." />
      {m.isError && <p role="alert" className="field-error">{errorText(m.error)}</p>}
      <button className="btn" type="submit" disabled={m.isPending}>{m.isPending ? 'Creating…' : 'Create workshop'}</button>
      <p>Have an account? <Link href="/sign-in" className="font-bold underline">Sign in</Link></p>
    </form>
  );
}
