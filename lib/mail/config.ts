/**
 * Mail settings from the environment, validated with zod.
 *
 * - `SMTP_HOST`, `SMTP_PORT` (default 587, or 465 when `SMTP_SECURE`), `SMTP_SECURE` ("true"/"false": TLS from
 *   the first byte; false means STARTTLS when the server offers it), `SMTP_USER` and `SMTP_PASS` (both or
 *   neither), `MAIL_FROM` (e.g. `Gridproof <checks@example.org>`).
 * - Without `SMTP_HOST` outside production, mail goes to the local development server (`LOCAL_SMTP_PORT`,
 *   default 2525, on 127.0.0.1) that `startLocalSmtp` runs; in production `SMTP_HOST` is required.
 * - `LOCAL_MAIL_DIR` (default `data/mail`): where the local server stores what it receives.
 */
import { z } from 'zod';

export const APP_NAME = 'Gridproof';
export const DEFAULT_LOCAL_SMTP_PORT = 2525;
export const DEFAULT_LOCAL_MAIL_DIR = 'data/mail';
export const DEFAULT_MAIL_FROM = `${APP_NAME} <no-reply@gridproof.localhost>`;

const boolFromEnv = z
  .enum(['true', 'false', '1', '0', 'yes', 'no', ''])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

const EnvSchema = z
  .object({
    NODE_ENV: z.string().optional(),
    SMTP_HOST: z.string().trim().min(1).optional(),
    SMTP_PORT: z.coerce.number().int().min(1).max(65535).optional(),
    SMTP_SECURE: boolFromEnv.optional(),
    SMTP_USER: z.string().min(1).optional(),
    SMTP_PASS: z.string().min(1).optional(),
    MAIL_FROM: z.string().trim().min(3).optional(),
    LOCAL_SMTP_PORT: z.coerce.number().int().min(1).max(65535).optional(),
    LOCAL_MAIL_DIR: z.string().min(1).optional(),
  })
  .superRefine((e, ctx) => {
    if ((e.SMTP_USER === undefined) !== (e.SMTP_PASS === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['SMTP_PASS'], message: 'set both SMTP_USER and SMTP_PASS, or neither' });
    }
    if (e.NODE_ENV === 'production' && !e.SMTP_HOST) {
      ctx.addIssue({ code: 'custom', path: ['SMTP_HOST'], message: 'SMTP_HOST is required in production' });
    }
  });

export interface MailConfig {
  /** 'smtp' when SMTP_HOST is set; 'local' for the development server on 127.0.0.1. */
  mode: 'smtp' | 'local';
  host: string;
  port: number;
  secure: boolean;
  auth: { user: string; pass: string } | undefined;
  from: string;
  localMailDir: string;
}

/** Reads and validates the mail settings; throws one readable error naming every bad variable. */
export function mailConfigFromEnv(env: Record<string, string | undefined> = process.env): MailConfig {
  const picked = Object.fromEntries(
    Object.entries(env).filter(([k, v]) => v !== undefined && v !== '' && (k === 'NODE_ENV' || k.startsWith('SMTP_') || k.startsWith('MAIL_') || k.startsWith('LOCAL_'))),
  );
  const parsed = EnvSchema.safeParse(picked);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.') || 'env'}: ${i.message}`);
    throw new Error(`mail settings are invalid: ${lines.join('; ')}`);
  }
  const e = parsed.data;
  const auth = e.SMTP_USER !== undefined && e.SMTP_PASS !== undefined ? { user: e.SMTP_USER, pass: e.SMTP_PASS } : undefined;
  const localMailDir = e.LOCAL_MAIL_DIR ?? DEFAULT_LOCAL_MAIL_DIR;
  const from = e.MAIL_FROM ?? DEFAULT_MAIL_FROM;
  if (e.SMTP_HOST) {
    const secure = e.SMTP_SECURE ?? e.SMTP_PORT === 465;
    return { mode: 'smtp', host: e.SMTP_HOST, port: e.SMTP_PORT ?? (secure ? 465 : 587), secure, auth, from, localMailDir };
  }
  return { mode: 'local', host: '127.0.0.1', port: e.LOCAL_SMTP_PORT ?? DEFAULT_LOCAL_SMTP_PORT, secure: false, auth, from, localMailDir };
}
