/** The worker's outbox loop: delivers queued mail over real SMTP to the local server, and stops cleanly. */
import { setTimeout as delay } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Db } from '@/db/client';
import { getOutgoingMail } from '@/db/queries/mail';
import { listLocalMail, passwordResetMail, queueMail, startLocalSmtp, type LocalSmtpServer } from '@/lib/mail';
import { mailEnv, startMailDelivery } from '@/lib/services/mail-delivery';
import { migratedDb, tempDir } from '@/tests/mail/helpers';

let db: Db;
let server: LocalSmtpServer;
let cleanup: () => Promise<void>;

beforeAll(async () => {
  const t = await tempDir('mail-loop');
  cleanup = t.cleanup;
  ({ db } = await migratedDb(t.dir));
  server = await startLocalSmtp({ port: 0, dir: `${t.dir}/inbox` });
});
afterAll(async () => {
  await server.close();
  db.$client.close();
  await cleanup();
});

describe('mail delivery loop', () => {
  it('sends what the outbox holds within a few intervals, then stops', async () => {
    const id = await queueMail(db, 'someone@example.test', 'password-reset', passwordResetMail({ userName: 'Someone', resetUrl: 'http://gridproof.test/reset-password/x', expiresAt: Date.now() + 3600e3 }));
    const loop = await startMailDelivery(db, { intervalMs: 50, env: { SMTP_HOST: '127.0.0.1', SMTP_PORT: String(server.port), SMTP_SECURE: 'false' } });
    expect(loop).not.toBeNull();
    for (let i = 0; i < 100 && (await getOutgoingMail(db, id))?.status !== 'sent'; i++) await delay(50);
    await loop!.stop();
    expect((await getOutgoingMail(db, id))?.status).toBe('sent');
    expect((await listLocalMail({ dir: server.dir })).map((m) => m.to.join(','))).toContain('someone@example.test');
  });

  it('is off with MAIL_DELIVERY=0, and a demo without SMTP_HOST uses the local server', async () => {
    expect(await startMailDelivery(db, { env: { MAIL_DELIVERY: '0' } })).toBeNull();
    expect(mailEnv({ NODE_ENV: 'production', DEMO_MODE: '1' }).NODE_ENV).toBe('development');
    expect(mailEnv({ NODE_ENV: 'production', DEMO_MODE: '1', SMTP_HOST: 'mail.example.test' }).NODE_ENV).toBe('production');
  });
});
