'use client';
/** Rename a bed and edit its notes (PATCH), delete it (DELETE, owner only). */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { api, errorText } from './api';

export function BedActions({ bedId, name, notes, canEdit, canDelete }: { bedId: string; name: string; notes: string | null; canEdit: boolean; canDelete: boolean }) {
  const router = useRouter();
  const qc = useQueryClient();
  const [draft, setDraft] = useState({ name, notes: notes ?? '' });
  const [confirming, setConfirming] = useState(false);
  const save = useMutation({
    mutationFn: () => api(`/api/beds/${bedId}`, { method: 'PATCH', body: { name: draft.name, notes: draft.notes || null } }),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: ['beds'] });
      router.refresh();
    },
  });
  const del = useMutation({
    mutationFn: () => api(`/api/beds/${bedId}`, { method: 'DELETE' }),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: ['beds'] });
      router.replace('/');
      router.refresh();
    },
  });
  if (!canEdit && !canDelete) return null;
  return (
    <section className="panel flex flex-col gap-4" aria-label="Edit bed">
      <h2 className="text-xl font-bold">Edit</h2>
      {canEdit && (
        <form className="flex flex-col gap-4" onSubmit={(e) => { e.preventDefault(); save.mutate(); }}>
          <label className="field"><span>Name</span><input className="input" value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} required /></label>
          <label className="field"><span>Notes</span><textarea className="input min-h-24" value={draft.notes} onChange={(e) => setDraft({ ...draft, notes: e.target.value })} /></label>
          {save.isError && <p role="alert" className="field-error">{errorText(save.error)}</p>}
          {save.isSuccess && <p role="status">Saved.</p>}
          <button className="btn self-start" type="submit" disabled={save.isPending}>Save</button>
        </form>
      )}
      {canDelete && (
        <div className="flex flex-wrap items-center gap-3 border-t border-line pt-4">
          {!confirming ? (
            <button type="button" className="btn btn-danger" onClick={() => setConfirming(true)}>Delete this bed…</button>
          ) : (
            <>
              <p className="font-bold">Delete the bed, its pattern versions and all its checks? This cannot be undone.</p>
              <button type="button" className="btn btn-danger" onClick={() => del.mutate()} disabled={del.isPending}>Yes, delete</button>
              <button type="button" className="btn btn-quiet" onClick={() => setConfirming(false)}>Keep it</button>
            </>
          )}
          {del.isError && <p role="alert" className="field-error">{errorText(del.error)}</p>}
        </div>
      )}
    </section>
  );
}
