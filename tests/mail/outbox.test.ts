/**
 * Outbox delivery against servers that fail: nothing listening (connection refused), a server answering a
 * transient 451 and one answering a permanent 550. Reply classes per RFC 5321 §4.2.1: 4yz is a transient
 * negative completion (try again), 5yz a permanent one (do not repeat the same request).
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { SMTPServer } from 'smtp-server';
import type { Db } from '@/db/client';
import { claimMailAttempt, enqueueMail, getOutgoingMail, listOutgoingMail, MAIL_RETRY_AFTER_MS } from '@/db/queries/mail';
import { mailConfigFromEnv } from '@/lib/mail/config';
import { ensureLocalSmtp, listLocalMail, startLocalSmtp } from '@/lib/mail/local-smtp';
import { deliverPendingMail, runMailDelivery } from '@/lib/mail/outbox';
import { createMailer, type Mailer } from '@/lib/mail/transport';
import { getEventListeners } from 'node:events';
import { setTimeout as delay } from 'node:timers/promises';
import { freePort } from '@/tests/free-port';
import { migratedDb, tempDir } from './helpers';

let cleanup: () => Promise<void>;
let dir: string;
let db: Db;
let workshopId: string;
const closers: (() => Promise<void> | void)[] = [];

beforeAll(async () => {
  const t = await tempDir('outbox');
  cleanup = t.cleanup;
  dir = t.dir;
  ({ db, workshopId } = await migratedDb(t.dir));
});
afterEach(async () => {
  while (closers.length) await closers.pop()!();
});
afterAll(async () => {
  db.$client.close();
  await cleanup();
});

function mailerAt(port: number): Mailer {
  const m = createMailer(mailConfigFromEnv({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(port), SMTP_SECURE: 'false', MAIL_FROM: 'checks@gridproof.test' }));
  closers.push(() => m.close());
  return m;
}

/** An SMTP server that refuses every message at DATA with `code`. */
async function refusingServer(code: number): Promise<{ port: number; seen: () => number }> {
  let seen = 0;
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    onData(stream, _session, callback) {
      stream.resume();
      stream.on('end', () => {
        seen += 1;
        callback(Object.assign(new Error(code >= 500 ? 'mailbox unavailable' : 'try again later'), { responseCode: code }));
      });
    },
  });
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', () => ok()));
  closers.push(() => new Promise<void>((ok) => server.close(() => ok())));
  const addr = server.server.address();
  return { port: typeof addr === 'object' && addr ? addr.port : 0, seen: () => seen };
}

async function queueOne(to: string): Promise<{ id: string; createdAt: number }> {
  const id = await enqueueMail(db, { workshopId, kind: 'invitation', to, subject: 'Join us', text: 'plain', html: '<p>html</p>' });
  const row = await getOutgoingMail(db, id);
  return { id, createdAt: row!.createdAt };
}

describe('outbox delivery', () => {
  it('retries after a refused connection and a transient 451, then delivers', async () => {
    const { id, createdAt } = await queueOne('retry@example.test');

    // 1st attempt: nothing listens on the port.
    const down = mailerAt(await freePort());
    expect(await deliverPendingMail(db, down.transport, { now: createdAt })).toEqual({ sent: 0, retrying: 1, failed: 0 });
    let row = await getOutgoingMail(db, id);
    expect(row).toMatchObject({ status: 'queued', attempts: 1 });
    expect(row?.error).toMatch(/ECONNREFUSED|ESOCKET|ECONNECTION/);

    // Not due again before the first retry delay has passed.
    expect(await deliverPendingMail(db, down.transport, { now: createdAt + MAIL_RETRY_AFTER_MS[1] - 1 })).toEqual({ sent: 0, retrying: 0, failed: 0 });
    expect((await getOutgoingMail(db, id))?.attempts).toBe(1);

    // 2nd attempt: the server answers 451.
    const busy = await refusingServer(451);
    expect(await deliverPendingMail(db, mailerAt(busy.port).transport, { now: createdAt + MAIL_RETRY_AFTER_MS[1] })).toEqual({ sent: 0, retrying: 1, failed: 0 });
    row = await getOutgoingMail(db, id);
    expect(row).toMatchObject({ status: 'queued', attempts: 2 });
    expect(row?.error).toContain('451');
    expect(busy.seen()).toBe(1);

    // 3rd attempt: a working server.
    const inbox = await startLocalSmtp({ port: 0, dir: `${dir}/inbox-retry` });
    closers.push(() => inbox.close());
    expect(await deliverPendingMail(db, mailerAt(inbox.port).transport, { now: createdAt + MAIL_RETRY_AFTER_MS[2] })).toEqual({ sent: 1, retrying: 0, failed: 0 });
    row = await getOutgoingMail(db, id);
    expect(row).toMatchObject({ status: 'sent', attempts: 3, error: null });
    expect(row?.sentAt).toBe(createdAt + MAIL_RETRY_AFTER_MS[2]);
  });

  it('gives a message up at once on a permanent 550 refusal', async () => {
    const { id, createdAt } = await queueOne('nobody@example.test');
    const refusing = await refusingServer(550);
    expect(await deliverPendingMail(db, mailerAt(refusing.port).transport, { now: createdAt })).toEqual({ sent: 0, retrying: 0, failed: 1 });
    const row = await getOutgoingMail(db, id);
    expect(row).toMatchObject({ status: 'failed', attempts: 1 });
    expect(row?.error).toContain('550');
    // A failed message is never tried again.
    expect(await deliverPendingMail(db, mailerAt(refusing.port).transport, { now: createdAt + 10 * 3_600_000 })).toEqual({ sent: 0, retrying: 0, failed: 0 });
    expect(refusing.seen()).toBe(1);
  });

  it('gives a message up after the last allowed attempt', async () => {
    const { id, createdAt } = await queueOne('late@example.test');
    const busy = await refusingServer(421);
    const m = mailerAt(busy.port);
    const results = [];
    for (let k = 0; k < 3; k += 1) results.push(await deliverPendingMail(db, m.transport, { now: createdAt + 10 * 3_600_000, maxAttempts: 3 }));
    expect(results.map((r) => [r.retrying, r.failed])).toEqual([[1, 0], [1, 0], [0, 1]]);
    expect(await getOutgoingMail(db, id)).toMatchObject({ status: 'failed', attempts: 3 });
    expect(busy.seen()).toBe(3);
  });

  it('lets only one mailer claim an attempt', async () => {
    const { id } = await queueOne('once@example.test');
    const [a, b] = await Promise.all([claimMailAttempt(db, id, 0), claimMailAttempt(db, id, 0)]);
    expect([a, b].filter((r) => r !== null)).toHaveLength(1);
    expect((await getOutgoingMail(db, id))?.attempts).toBe(1);
  });

  it('queues a message only when the transaction that caused it commits', async () => {
    const before = (await listOutgoingMail(db, { workshopId })).length;
    await expect(
      db.transaction(async (tx) => {
        await enqueueMail(tx, { workshopId, kind: 'invitation', to: 'rolled@example.test', subject: 's', text: 't' });
        throw new Error('the invitation insert failed');
      }),
    ).rejects.toThrow('the invitation insert failed');
    expect((await listOutgoingMail(db, { workshopId })).length).toBe(before);
  });
});

describe('mail delivery loop', () => {
  it('delivers what is queued while it runs and stops when aborted', async () => {
    const inbox = await startLocalSmtp({ port: 0, dir: `${dir}/inbox-loop` });
    closers.push(() => inbox.close());
    const m = mailerAt(inbox.port);
    const { id } = await queueOne('loop@example.test');
    const stop = new AbortController();
    const loop = runMailDelivery(db, m.transport, { intervalMs: 20, signal: stop.signal });
    for (let k = 0; k < 200 && (await getOutgoingMail(db, id))?.status !== 'sent'; k += 1) await delay(20);
    stop.abort();
    await loop;
    expect((await getOutgoingMail(db, id))?.status).toBe('sent');
    expect((await listLocalMail({ dir: `${dir}/inbox-loop` })).map((x) => x.to)).toEqual([['loop@example.test']]);
  });

  it('keeps at most one listener on its stop signal however many passes it makes', async () => {
    const inbox = await startLocalSmtp({ port: 0, dir: `${dir}/inbox-idle` });
    closers.push(() => inbox.close());
    const stop = new AbortController();
    const loop = runMailDelivery(db, mailerAt(inbox.port).transport, { intervalMs: 2, signal: stop.signal });
    let most = 0;
    for (let k = 0; k < 40; k += 1) { // about 100 passes of 2 ms
      await delay(5);
      most = Math.max(most, getEventListeners(stop.signal, 'abort').length);
    }
    stop.abort();
    await loop;
    // Node warns past 10 listeners on one signal; a wait that forgot its listener would leave one per pass
    expect(most).toBeLessThanOrEqual(1);
  });
});

describe('local mail server start-up', () => {
  it('is not started when a real SMTP server is configured or in production', async () => {
    // ensureLocalSmtp decides once per process; clear its slot to check each case.
    const slot = Symbol.for('gridproof.localSmtp');
    const g = globalThis as unknown as Record<symbol, unknown>;
    delete g[slot];
    expect(await ensureLocalSmtp({ env: { SMTP_HOST: 'smtp.example.test' } })).toBeNull();
    delete g[slot];
    expect(await ensureLocalSmtp({ env: { NODE_ENV: 'production' } })).toBeNull();
    delete g[slot];
    // A port already taken by another process's server: no error, no second server.
    const other = await startLocalSmtp({ port: 0, dir: `${dir}/inbox-other` });
    closers.push(() => other.close());
    expect(await ensureLocalSmtp({ env: { LOCAL_SMTP_PORT: String(other.port), LOCAL_MAIL_DIR: `${dir}/inbox-other` } })).toBeNull();
    delete g[slot];
    const port = await freePort();
    const started = await ensureLocalSmtp({ env: { LOCAL_SMTP_PORT: String(port), LOCAL_MAIL_DIR: `${dir}/inbox-ensure` } });
    expect(started?.port).toBe(port);
    closers.push(() => started?.close());
    // Started once per process.
    expect(await ensureLocalSmtp({ env: { LOCAL_SMTP_PORT: String(port) } })).toBe(started);
    delete g[slot];
  });
});
