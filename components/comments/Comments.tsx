'use client';
/**
 * Comments on a check or on one of its positions. `CommentList` only shows them (the shared page uses it);
 * `CommentsPanel` reads `/api/checks/{id}/comments`, lets any member add one (optionally naming a position,
 * `dog B3` or just `B3`) and the author or an owner delete theirs. For the report page:
 *   <CommentsPanel checkId={id} meId={user.id} isOwner={role === 'owner'} positionLabels={report.positions.map((p) => p.label)} />
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useId, useState, type FormEvent } from 'react';
import { api, errorText, fieldError } from '@/components/api';
import { formatUtc } from '@/lib/dates';

export interface CommentItem {
  id: string;
  authorId?: string | null;
  authorName: string | null;
  positionLabel: string | null;
  body: string;
  createdAt: number;
}


export function CommentList({ comments, canDelete, onDelete, onSelectPosition }: {
  comments: CommentItem[];
  canDelete?: (c: CommentItem) => boolean;
  onDelete?: (c: CommentItem) => void;
  /** Called with a comment's position label (e.g. to highlight it on the map). */
  onSelectPosition?: (label: string) => void;
}) {
  if (comments.length === 0) return <p className="text-muted">No comments yet.</p>;
  return (
    <ol className="flex flex-col gap-3" data-testid="comments">
      {comments.map((c) => (
        <li key={c.id} className="rounded-lg border border-line p-3">
          <p className="flex flex-wrap items-baseline gap-x-3 text-sm text-muted">
            <strong className="text-ink">{c.authorName ?? 'A former member'}</strong>
            <span>{formatUtc(c.createdAt)}</span>
            {c.positionLabel && (onSelectPosition
              ? <button type="button" className="font-mono font-bold text-accent underline" onClick={() => onSelectPosition(c.positionLabel!)}>{c.positionLabel}</button>
              : <span className="font-mono font-bold text-ink">{c.positionLabel}</span>)}
            {!c.positionLabel && <span>on the whole check</span>}
          </p>
          <p className="mt-1 whitespace-pre-wrap">{c.body}</p>
          {canDelete?.(c) && onDelete && (
            <button type="button" className="btn btn-quiet mt-2 !min-h-0 !py-1 text-sm" onClick={() => onDelete(c)}>Delete</button>
          )}
        </li>
      ))}
    </ol>
  );
}

export function CommentsPanel({ checkId, meId, isOwner, positionLabels = [], canComment = true, onSelectPosition }: {
  checkId: string;
  meId: string;
  isOwner: boolean;
  positionLabels?: string[];
  canComment?: boolean;
  onSelectPosition?: (label: string) => void;
}) {
  const qc = useQueryClient();
  const listId = useId();
  const key = ['comments', checkId];
  const q = useQuery({ queryKey: key, queryFn: () => api<{ comments: CommentItem[] }>(`/api/checks/${checkId}/comments`) });
  const [body, setBody] = useState('');
  const [position, setPosition] = useState('');
  const add = useMutation({
    mutationFn: () => api(`/api/checks/${checkId}/comments`, { body: { body, positionLabel: position.trim() || null } }),
    onSuccess: async () => {
      setBody('');
      setPosition('');
      await qc.invalidateQueries({ queryKey: key });
    },
  });
  const del = useMutation({
    mutationFn: (c: CommentItem) => api(`/api/checks/${checkId}/comments/${c.id}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    add.mutate();
  };
  return (
    <section className="panel flex flex-col gap-4" aria-labelledby={`${listId}-h`} data-testid="comments-panel">
      <h2 id={`${listId}-h`} className="text-xl font-bold">Comments</h2>
      {q.isPending ? <p className="text-muted">Loading comments…</p> : q.isError ? <p role="alert" className="field-error">{errorText(q.error)}</p> : (
        <CommentList comments={q.data.comments} onSelectPosition={onSelectPosition} canDelete={(c) => isOwner || c.authorId === meId} onDelete={(c) => del.mutate(c)} />
      )}
      {canComment && (
        <form className="flex flex-col gap-3" onSubmit={submit} aria-label="Add a comment">
          <label className="field">
            <span>Position (optional)</span>
            <input className="input font-mono" value={position} onChange={(e) => setPosition(e.target.value)} list={`${listId}-labels`} placeholder={`e.g. ${positionLabels[0] ?? 'dog B3'}`} maxLength={60} />
            <datalist id={`${listId}-labels`}>{positionLabels.map((l) => <option key={l} value={l} />)}</datalist>
            {fieldError(add.error, 'positionLabel') && <small className="field-error">{fieldError(add.error, 'positionLabel')}</small>}
          </label>
          <label className="field">
            <span>Comment</span>
            <textarea className="input min-h-24" value={body} onChange={(e) => setBody(e.target.value)} maxLength={2000} required placeholder="binds when hot" />
          </label>
          {add.isError && !fieldError(add.error, 'positionLabel') && <p role="alert" className="field-error">{errorText(add.error)}</p>}
          <button className="btn self-start" type="submit" disabled={add.isPending}>{add.isPending ? 'Saving…' : 'Add comment'}</button>
        </form>
      )}
    </section>
  );
}
