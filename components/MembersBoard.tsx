'use client';
/** Members and invitations (GET/POST /api/members, PATCH/DELETE /api/members/{id}, DELETE /api/invitations/{id}). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { api, errorText, fieldError } from './api';
import { formatUtc } from '@/lib/dates';

type Role = 'owner' | 'machinist' | 'reviewer';
type Member = { userId: string; name: string; email: string; role: Role; joinedAt: number };
type Invitation = { id: string; email: string; role: Role; createdAt: number; expiresAt: number };
type Data = { members: Member[]; invitations: Invitation[] };

const ROLE_WORDS: Record<Role, string> = {
  owner: 'Owner — members, settings, deletion, and all a machinist does',
  machinist: 'Machinist — beds, photos, checks, sharing',
  reviewer: 'Reviewer — reads and comments',
};

export function MembersBoard({ initial, isOwner, meId }: { initial: Data; isOwner: boolean; meId: string }) {
  const qc = useQueryClient();
  const q = useQuery({ queryKey: ['members'], queryFn: () => api<Data>('/api/members'), initialData: initial });
  const refresh = () => qc.invalidateQueries({ queryKey: ['members'] });
  const role = useMutation({ mutationFn: (v: { userId: string; role: Role }) => api(`/api/members/${v.userId}`, { method: 'PATCH', body: { role: v.role } }), onSettled: refresh });
  const remove = useMutation({ mutationFn: (userId: string) => api(`/api/members/${userId}`, { method: 'DELETE' }), onSettled: refresh });
  const revoke = useMutation({ mutationFn: (id: string) => api(`/api/invitations/${id}`, { method: 'DELETE' }), onSettled: refresh });
  const { members, invitations } = q.data;
  const problem = role.error ?? remove.error ?? revoke.error;
  return (
    <div className="flex flex-col gap-6">
      <section className="panel" aria-label="Members">
        <h2 className="mb-3 text-xl font-bold">Members</h2>
        {problem && <p role="alert" className="field-error mb-3">{errorText(problem)}</p>}
        <ul className="flex flex-col divide-y divide-line">
          {members.map((m) => (
            <li key={m.userId} className="flex flex-wrap items-center gap-3 py-3">
              <span className="min-w-48 flex-1"><strong>{m.name}</strong>{m.userId === meId ? ' (you)' : ''}<br /><span className="text-sm text-muted">{m.email}</span></span>
              {isOwner ? (
                <>
                  <label className="flex items-center gap-2">
                    <span className="sr-only">Role of {m.name}</span>
                    <select className="input w-auto" value={m.role} disabled={role.isPending} onChange={(e) => role.mutate({ userId: m.userId, role: e.target.value as Role })}>
                      <option value="owner">Owner</option><option value="machinist">Machinist</option><option value="reviewer">Reviewer</option>
                    </select>
                  </label>
                  {m.userId !== meId && <button type="button" className="btn btn-danger" onClick={() => remove.mutate(m.userId)} disabled={remove.isPending}>Remove</button>}
                </>
              ) : (
                <span className="font-bold capitalize">{m.role}</span>
              )}
            </li>
          ))}
        </ul>
        <p className="mt-3 text-sm text-muted">{Object.values(ROLE_WORDS).join(' · ')}</p>
      </section>
      {isOwner && <InviteForm onDone={refresh} />}
      {isOwner && invitations.length > 0 && (
        <section className="panel" aria-label="Open invitations">
          <h2 className="mb-3 text-xl font-bold">Open invitations</h2>
          <ul className="flex flex-col divide-y divide-line">
            {invitations.map((i) => (
              <li key={i.id} className="flex flex-wrap items-center gap-3 py-3">
                <span className="flex-1">{i.email} — <span className="capitalize">{i.role}</span><br /><span className="text-sm text-muted">valid until {formatUtc(i.expiresAt)}</span></span>
                <button type="button" className="btn btn-quiet" onClick={() => revoke.mutate(i.id)} disabled={revoke.isPending}>Revoke</button>
              </li>
            ))}
          </ul>
        </section>
      )}
    </div>
  );
}

function InviteForm({ onDone }: { onDone: () => Promise<void> }) {
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('machinist');
  const [copied, setCopied] = useState(false);
  const m = useMutation({
    mutationFn: () => api<{ link: string; invitation: Invitation }>('/api/members', { body: { email, role } }),
    onSuccess: () => {
      setEmail('');
      setCopied(false);
      return onDone();
    },
  });
  const copy = async (link: string) => {
    try {
      await navigator.clipboard.writeText(link);
      setCopied(true);
    } catch {
      setCopied(false);
    }
  };
  return (
    <form className="panel flex flex-col gap-4" aria-label="Invite someone" onSubmit={(e) => { e.preventDefault(); m.mutate(); }}>
      <h2 className="text-xl font-bold">Invite someone</h2>
      <div className="grid gap-4 sm:grid-cols-2">
        <label className="field"><span>E-mail</span><input className="input" type="email" name="email" value={email} onChange={(e) => setEmail(e.target.value)} required />
          {fieldError(m.error, 'email') && <small className="field-error">{fieldError(m.error, 'email')}</small>}</label>
        <label className="field"><span>Role</span>
          <select className="input" name="role" value={role} onChange={(e) => setRole(e.target.value as Role)}>
            <option value="machinist">Machinist</option><option value="reviewer">Reviewer</option><option value="owner">Owner</option>
          </select>
        </label>
      </div>
      {m.isError && !fieldError(m.error, 'email') && <p role="alert" className="field-error">{errorText(m.error)}</p>}
      <button className="btn self-start" type="submit" disabled={m.isPending}>Create invitation link</button>
      {m.isSuccess && (
        <div className="flex flex-col gap-2 border-t border-line pt-4" role="status">
          <p>Send this link to {m.data.invitation.email}. It works once, for 7 days, and is shown only now.</p>
          <input className="input font-mono text-sm" readOnly value={m.data.link} aria-label="Invitation link" onFocus={(e) => e.currentTarget.select()} />
          <button type="button" className="btn btn-quiet self-start" onClick={() => void copy(m.data.link)}>{copied ? 'Copied' : 'Copy link'}</button>
        </div>
      )}
    </form>
  );
}
