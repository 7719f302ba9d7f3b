/**
 * Delivers the outbox: the worker calls `deliverPendingMail(db, transport)` every few seconds. Each due message
 * is claimed atomically, sent, and marked sent; a failed attempt records its error and waits for the next slot
 * of the retry schedule (db/queries/mail.ts). A permanent refusal (SMTP reply 5yz, RFC 5321 §4.2.1) gives the
 * message up at once; connection failures and transient replies (4yz) are retried. Delivery is at least once.
 */
import type { Db } from '@/db/client';
import {
  claimMailAttempt,
  DEFAULT_MAX_MAIL_ATTEMPTS,
  enqueueMail,
  listDueMail,
  markMailAttemptFailed,
  markMailSent,
  type DbOrTx,
} from '@/db/queries/mail';
import { mailConfigFromEnv } from './config';
import type { MailContent, MailKind } from './templates';
import type { MailTransport } from './transport';

export interface DeliverOptions {
  /** Sender when the transport has no default (from MAIL_FROM otherwise). */
  from?: string;
  /** Clock, ms since the Unix epoch (tests move it forward). */
  now?: number;
  /** Most messages per call (default 20). */
  limit?: number;
  maxAttempts?: number;
}

export interface DeliverResult {
  sent: number;
  retrying: number;
  failed: number;
}

function describe(err: unknown): { message: string; permanent: boolean } {
  const e = err as { message?: string; responseCode?: number; code?: string; response?: string };
  const code = typeof e.responseCode === 'number' ? e.responseCode : null;
  const message = [code ? `SMTP ${code}` : e.code, e.response ?? e.message ?? String(err)].filter(Boolean).join(': ');
  return { message, permanent: code !== null && code >= 500 && code < 600 };
}

/** Sends every due message once; returns how many went out, wait for a retry, or were given up. */
export async function deliverPendingMail(db: Db, transport: MailTransport, opts: DeliverOptions = {}): Promise<DeliverResult> {
  const maxAttempts = opts.maxAttempts ?? DEFAULT_MAX_MAIL_ATTEMPTS;
  const now = opts.now ?? Date.now();
  const from = opts.from ?? transport.from ?? mailConfigFromEnv().from;
  const due = await listDueMail(db, { now, limit: opts.limit ?? 20, maxAttempts });
  const result: DeliverResult = { sent: 0, retrying: 0, failed: 0 };
  for (const row of due) {
    const claimed = await claimMailAttempt(db, row.id, row.attempts);
    if (!claimed) continue; // another mailer took this attempt
    try {
      const info = await transport.sendMail({
        from,
        to: claimed.toAddress,
        subject: claimed.subject,
        text: claimed.text,
        ...(claimed.html ? { html: claimed.html } : {}),
      });
      await markMailSent(db, claimed.id, claimed.attempts, info.messageId ?? null, opts.now ?? Date.now());
      result.sent += 1;
    } catch (err) {
      const { message, permanent } = describe(err);
      const final = permanent || claimed.attempts >= maxAttempts;
      await markMailAttemptFailed(db, claimed.id, claimed.attempts, message, final);
      if (final) result.failed += 1;
      else result.retrying += 1;
    }
  }
  return result;
}

/** Queues a rendered template in the caller's transaction (see `enqueueMail`). */
export function queueMail(tx: DbOrTx, to: string, kind: MailKind, content: MailContent, workshopId?: string | null): Promise<string> {
  return enqueueMail(tx, { workshopId: workshopId ?? null, kind, to, subject: content.subject, text: content.text, html: content.html });
}

/**
 * Delivers the outbox every `intervalMs` (default 5 s) until `signal` aborts; one pass at a time. Errors of a
 * pass (the database busy, …) go to `onError` and the loop goes on. For the worker process.
 */
export async function runMailDelivery(db: Db, transport: MailTransport, opts: DeliverOptions & { intervalMs?: number; signal?: AbortSignal; onError?: (err: unknown) => void } = {}): Promise<void> {
  const interval = opts.intervalMs ?? 5_000;
  while (!opts.signal?.aborted) {
    try {
      await deliverPendingMail(db, transport, { from: opts.from, limit: opts.limit, maxAttempts: opts.maxAttempts });
    } catch (err) {
      opts.onError?.(err);
    }
    // one listener per wait, removed when the wait ends either way: a loop that runs for days must not pile
    // them up on the signal
    await new Promise<void>((ok) => {
      const done = () => { clearTimeout(t); opts.signal?.removeEventListener('abort', done); ok(); };
      const t = setTimeout(done, interval);
      opts.signal?.addEventListener('abort', done, { once: true });
    });
  }
}
