/**
 * Outgoing mail (the outbox). `enqueueMail` writes a message in the caller's transaction, so a message exists
 * exactly when what caused it was committed; the mailer (lib/mail/outbox.ts) claims due rows one by one and
 * marks them sent or failed. Times are ms since the Unix epoch. No cookies or sessions here.
 */
import { randomUUID } from 'node:crypto';
import { and, asc, desc, eq, lt, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { outgoingMail } from '@/db/schema';

/** A database or an open transaction of it. */
export type DbOrTx = Db | Parameters<Parameters<Db['transaction']>[0]>[0];

export type OutgoingMailRow = typeof outgoingMail.$inferSelect;

/** Attempts before a message is given up (each one is a full SMTP conversation). */
export const DEFAULT_MAX_MAIL_ATTEMPTS = 6;

/**
 * When attempt n+1 may start, counted from when the message was queued, ms: at once, then after 1 min, 5 min,
 * 20 min, 1 h and 3 h. Counting from the queueing time needs no extra column and keeps the schedule whatever
 * the worker's polling interval.
 */
export const MAIL_RETRY_AFTER_MS = [0, 60_000, 300_000, 1_200_000, 3_600_000, 10_800_000] as const;

export interface EnqueueMailInput {
  workshopId?: string | null;
  /** What the message is: 'report', 'invitation', 'password-reset', … */
  kind: string;
  to: string;
  subject: string;
  text: string;
  html?: string | null;
}

/** Queues one message in the caller's transaction; returns its id. */
export async function enqueueMail(tx: DbOrTx, input: EnqueueMailInput): Promise<string> {
  const id = randomUUID();
  await tx.insert(outgoingMail).values({
    id,
    workshopId: input.workshopId ?? null,
    kind: input.kind,
    toAddress: input.to,
    subject: input.subject,
    text: input.text,
    html: input.html ?? null,
    status: 'queued',
    attempts: 0,
    createdAt: Date.now(),
  });
  return id;
}

function retryAfterSql() {
  const cases = MAIL_RETRY_AFTER_MS.map((ms, n) => sql`WHEN ${n} THEN ${ms}`);
  const last = MAIL_RETRY_AFTER_MS[MAIL_RETRY_AFTER_MS.length - 1] ?? 0;
  return sql`CASE ${outgoingMail.attempts} ${sql.join(cases, sql` `)} ELSE ${last} END`;
}

/** Queued messages whose next attempt is due at `now`, oldest first. */
export async function listDueMail(db: DbOrTx, opts: { now: number; limit: number; maxAttempts: number }): Promise<OutgoingMailRow[]> {
  return db
    .select()
    .from(outgoingMail)
    .where(
      and(
        eq(outgoingMail.status, 'queued'),
        lt(outgoingMail.attempts, opts.maxAttempts),
        sql`${outgoingMail.createdAt} + ${retryAfterSql()} <= ${opts.now}`,
      ),
    )
    .orderBy(asc(outgoingMail.createdAt))
    .limit(opts.limit);
}

/**
 * Claims one attempt at a message with one atomic UPDATE … RETURNING: it succeeds only if the row is still
 * queued with the attempt count the caller saw, so two mailers never send the same attempt.
 */
export async function claimMailAttempt(db: DbOrTx, id: string, seenAttempts: number): Promise<OutgoingMailRow | null> {
  const rows = await db
    .update(outgoingMail)
    .set({ attempts: sql`${outgoingMail.attempts} + 1` })
    .where(and(eq(outgoingMail.id, id), eq(outgoingMail.status, 'queued'), eq(outgoingMail.attempts, seenAttempts)))
    .returning();
  return rows[0] ?? null;
}

/** Marks a claimed attempt delivered. */
export async function markMailSent(db: DbOrTx, id: string, attempt: number, messageId: string | null, at: number): Promise<void> {
  await db
    .update(outgoingMail)
    .set({ status: 'sent', sentAt: at, messageId, error: null })
    .where(and(eq(outgoingMail.id, id), eq(outgoingMail.attempts, attempt)));
}

/** Records a failed attempt; `final` gives the message up. */
export async function markMailAttemptFailed(db: DbOrTx, id: string, attempt: number, error: string, final: boolean): Promise<void> {
  await db
    .update(outgoingMail)
    .set({ status: final ? 'failed' : 'queued', error: error.slice(0, 1000) })
    .where(and(eq(outgoingMail.id, id), eq(outgoingMail.attempts, attempt)));
}

/** The outbox as an owner sees it: newest first, optionally one workshop's only. */
export async function listOutgoingMail(db: DbOrTx, opts: { workshopId?: string; limit?: number } = {}): Promise<OutgoingMailRow[]> {
  const q = db.select().from(outgoingMail);
  const filtered = opts.workshopId ? q.where(eq(outgoingMail.workshopId, opts.workshopId)) : q;
  return filtered.orderBy(desc(outgoingMail.createdAt)).limit(opts.limit ?? 100);
}

/** One outgoing message by id. */
export async function getOutgoingMail(db: DbOrTx, id: string): Promise<OutgoingMailRow | null> {
  const rows = await db.select().from(outgoingMail).where(eq(outgoingMail.id, id)).limit(1);
  return rows[0] ?? null;
}
