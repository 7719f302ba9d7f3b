'use client';
/**
 * Sharing one check: make a read-only link (its address is shown once, to copy), send the report to a helper
 * by e-mail with a note, see each link's views and expiry, revoke one. Owners and machinists only (the server
 * checks again). For the report page: <SharePanel checkId={id} />.
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { api, errorText, fieldError } from '@/components/api';
import { formatUtc } from '@/lib/dates';

interface LinkRow { id: string; label: string | null; createdAt: number; expiresAt: number; revokedAt: number | null; viewCount: number; lastViewedAt: number | null; live: boolean }


export function SharePanel({ checkId }: { checkId: string }) {
  const qc = useQueryClient();
  const key = ['share-links', checkId];
  const links = useQuery({ queryKey: key, queryFn: () => api<{ links: LinkRow[] }>(`/api/checks/${checkId}/share`) });
  const [days, setDays] = useState(14);
  const [fresh, setFresh] = useState<{ url: string; expiresAt: number; sentTo?: string } | null>(null);
  const [copied, setCopied] = useState(false);
  const [label, setLabel] = useState('');
  const [email, setEmail] = useState('');
  const [note, setNote] = useState('');
  const refresh = () => qc.invalidateQueries({ queryKey: key });

  const create = useMutation({
    mutationFn: () => api<{ link: { url: string; expiresAt: number } }>(`/api/checks/${checkId}/share`, { body: { expiresInDays: days, label: label || undefined } }),
    onSuccess: async (r) => { setFresh(r.link); setCopied(false); setLabel(''); await refresh(); },
  });
  const send = useMutation({
    mutationFn: () => api<{ link: { url: string; expiresAt: number }; sentTo: string }>(`/api/checks/${checkId}/send`, { body: { email, note: note || undefined, expiresInDays: days } }),
    onSuccess: async (r) => { setFresh({ ...r.link, sentTo: r.sentTo }); setEmail(''); setNote(''); await refresh(); },
  });
  const revoke = useMutation({ mutationFn: (id: string) => api(`/api/share-links/${id}`, { method: 'DELETE' }), onSuccess: refresh });

  const copy = async () => {
    if (!fresh) return;
    await navigator.clipboard.writeText(fresh.url).then(() => setCopied(true), () => setCopied(false));
  };
  const onSend = (e: FormEvent) => { e.preventDefault(); send.mutate(); };

  return (
    <section className="panel flex flex-col gap-5" aria-labelledby="share-h" data-testid="share-panel">
      <div>
        <h2 id="share-h" className="text-xl font-bold">Share this report</h2>
        <p className="text-muted">Whoever has the link sees the verdict, the map, the tables and the comments — no photo, no other bed, no account needed. Revoke it any time.</p>
      </div>
      <label className="field max-w-xs">
        <span>Link works for</span>
        <select className="input" value={days} onChange={(e) => setDays(Number(e.target.value))}>
          {[1, 3, 7, 14, 30, 90].map((d) => <option key={d} value={d}>{d} day{d === 1 ? '' : 's'}</option>)}
        </select>
      </label>
      <div className="flex flex-wrap items-end gap-3">
        <label className="field max-w-xs flex-1">
          <span>Who it is for (optional)</span>
          <input className="input" value={label} onChange={(e) => setLabel(e.target.value)} maxLength={120} placeholder="Sam at the sign shop" data-testid="link-label" />
        </label>
        <button type="button" className="btn" onClick={() => create.mutate()} disabled={create.isPending} data-testid="make-link">Make a link</button>
      </div>
      {create.isError && <p role="alert" className="field-error">{errorText(create.error)}</p>}
      {fresh && (
        <div className="rounded-lg border-2 border-accent p-3" data-testid="fresh-link">
          <p className="font-bold">{fresh.sentTo ? `Sent to ${fresh.sentTo}. The link in the mail:` : 'Copy the link now: it is shown only this once.'}</p>
          <p className="mt-1 break-all font-mono text-sm" data-testid="fresh-link-url">{fresh.url}</p>
          <p className="text-sm text-muted">Works until {formatUtc(fresh.expiresAt)}.</p>
          <button type="button" className="btn btn-quiet mt-2" onClick={() => void copy()}>{copied ? 'Copied' : 'Copy'}</button>
        </div>
      )}

      <form className="flex flex-col gap-3 border-t border-line pt-4" onSubmit={onSend} aria-label="Send to a helper">
        <h3 className="text-lg font-bold">Send to a helper</h3>
        <label className="field">
          <span>Their e-mail</span>
          <input className="input" type="email" value={email} onChange={(e) => setEmail(e.target.value)} required autoComplete="off" />
          {fieldError(send.error, 'email') && <small className="field-error">{fieldError(send.error, 'email')}</small>}
        </label>
        <label className="field">
          <span>A short note (optional)</span>
          <textarea className="input min-h-20" value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} placeholder="Could you look at the left strip?" />
        </label>
        {send.isError && !fieldError(send.error, 'email') && <p role="alert" className="field-error">{errorText(send.error)}</p>}
        <button className="btn self-start" type="submit" disabled={send.isPending}>{send.isPending ? 'Sending…' : 'Send the report'}</button>
      </form>

      <div className="border-t border-line pt-4">
        <h3 className="text-lg font-bold">Links of this check</h3>
        {links.isPending ? <p className="text-muted">Loading…</p> : links.isError ? <p className="field-error">{errorText(links.error)}</p> : links.data.links.length === 0 ? <p className="text-muted">None yet.</p> : (
          <ul className="mt-2 flex flex-col gap-2" data-testid="share-links">
            {links.data.links.map((l) => (
              <li key={l.id} className="flex flex-wrap items-center justify-between gap-2 rounded-lg border border-line p-3">
                <span>
                  <strong data-testid="link-label-shown">{l.label ?? 'No name given'}</strong>
                  <span> · {l.live ? 'Live' : l.revokedAt ? 'Revoked' : 'Expired'}</span>
                  <span className="text-muted"> · made {formatUtc(l.createdAt)} · {l.live ? `until ${formatUtc(l.expiresAt)}` : ''} · {l.viewCount} view{l.viewCount === 1 ? '' : 's'}</span>
                </span>
                {l.live && <button type="button" className="btn btn-danger !min-h-0 !py-1" onClick={() => revoke.mutate(l.id)} disabled={revoke.isPending}>Revoke</button>}
              </li>
            ))}
          </ul>
        )}
      </div>
    </section>
  );
}
