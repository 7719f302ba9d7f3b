/**
 * The mail delivery loop for the worker process: every few seconds it sends what the outbox holds (report
 * links, invitations, password resets) through SMTP (`SMTP_*`), or — in development, the demo and tests, when no
 * SMTP_HOST is set — through the local development server, which it starts here once per machine (the web
 * app's dev-only outbox page reads what that server stored). `MAIL_DELIVERY=0` turns the loop off.
 */
import type { Db } from '@/db/client';
import { isDemoMode } from '@/lib/auth/secret';
import { createMailer, ensureLocalSmtp, runMailDelivery } from '@/lib/mail';
import { mailConfigFromEnv } from '@/lib/mail/config';

/** The environment the mail settings are read from: a demo without SMTP_HOST uses the local server. */
type Env = Record<string, string | undefined>;

export function mailEnv(env: Env = process.env): Env {
  if (!env.SMTP_HOST && isDemoMode(env as NodeJS.ProcessEnv)) return { ...env, NODE_ENV: 'development' };
  return { ...env };
}

export interface MailDelivery {
  /** Resolves when the loop has stopped. */
  done: Promise<void>;
  stop(): Promise<void>;
}

/** Starts delivering the outbox; null when MAIL_DELIVERY=0. Throws on invalid mail settings. */
export async function startMailDelivery(db: Db, opts: { intervalMs?: number; log?: (event: string, detail: Record<string, unknown>) => void; env?: Env } = {}): Promise<MailDelivery | null> {
  const env = opts.env ?? process.env;
  if (env.MAIL_DELIVERY === '0' || env.MAIL_DELIVERY === 'false') return null;
  const menv = mailEnv(env);
  const config = mailConfigFromEnv(menv);
  const local = config.mode === 'local' ? await ensureLocalSmtp({ env: menv }) : null;
  const mailer = createMailer(config);
  const abort = new AbortController();
  opts.log?.('mail.delivery', { mode: config.mode, host: config.host, port: config.port, localServer: Boolean(local) });
  const done = runMailDelivery(db, mailer, {
    intervalMs: opts.intervalMs,
    signal: abort.signal,
    onError: (err) => opts.log?.('mail.error', { error: err instanceof Error ? err.message : String(err) }),
  }).finally(() => mailer.close());
  return {
    done,
    stop: async () => {
      abort.abort();
      await done;
      await local?.close();
    },
  };
}
