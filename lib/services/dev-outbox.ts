/**
 * The dev-only outbox for owners: what this workshop's Gridproof sent or will send (report links,
 * invitations), read from the outbox table, and whether the local development mail server received it.
 * Available only outside production or in the demo. A password-reset mail is shown only to the person it is
 * addressed to (an owner must not read a member's reset link).
 */
import type { Db } from '@/db/client';
import { getOutgoingMail, listOutgoingMail, type OutgoingMailRow } from '@/db/queries/mail';
import { isDemoMode } from '@/lib/auth/secret';
import { notFound } from '@/lib/http/errors';
import { listLocalMail } from '@/lib/mail';
import { authorize, type Actor } from './actor';

/** True where the outbox page may exist at all. */
export function outboxAvailable(env: NodeJS.ProcessEnv = process.env): boolean {
  return env.NODE_ENV !== 'production' || isDemoMode(env);
}

const visibleTo = (actor: Actor, m: OutgoingMailRow) => m.workshopId === actor.workshopId && (m.kind !== 'password-reset' || m.toAddress === actor.user.email);

export type OutboxRow = Pick<OutgoingMailRow, 'id' | 'kind' | 'toAddress' | 'subject' | 'status' | 'attempts' | 'error' | 'createdAt' | 'sentAt'> & { receivedLocally: boolean };

export async function listOutbox(db: Db, actor: Actor): Promise<OutboxRow[]> {
  if (!outboxAvailable()) throw notFound('page');
  authorize(actor, 'members:manage');
  const rows = (await listOutgoingMail(db, { workshopId: actor.workshopId, limit: 200 })).filter((m) => visibleTo(actor, m));
  const local = new Set((await listLocalMail({ limit: 500 }).catch(() => [])).map((m) => m.messageId).filter(Boolean));
  return rows.map((m) => ({ id: m.id, kind: m.kind, toAddress: m.toAddress, subject: m.subject, status: m.status, attempts: m.attempts, error: m.error, createdAt: m.createdAt, sentAt: m.sentAt, receivedLocally: Boolean(m.messageId && local.has(m.messageId)) }));
}

export async function getOutboxMail(db: Db, actor: Actor, id: string): Promise<OutgoingMailRow> {
  if (!outboxAvailable()) throw notFound('page');
  authorize(actor, 'members:manage');
  const m = await getOutgoingMail(db, id);
  if (!m || !visibleTo(actor, m)) throw notFound('message');
  return m;
}
