/**
 * Password reset by e-mail. Asking always answers the same (no hint whether the address has an account); for
 * a known address a single-use token (32 random bytes, base64url; only its SHA-256 stored) valid for one hour
 * is made and the mail queued in the same transaction. Using it sets the new password, spends every other
 * open token of the user and signs them out everywhere (all sessions revoked). Asking is rate-limited per
 * address.
 */
import { createHash, randomBytes } from 'node:crypto';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { listUserWorkshops } from '@/db/queries/memberships';
import * as q from '@/db/queries/password-resets';
import { hitRateLimit } from '@/db/queries/rate-limits';
import { revokeUserSessions } from '@/db/queries/sessions';
import { findUserByEmail, getUserById, normaliseEmail, toPublicUser, type PublicUser } from '@/db/queries/users';
import { hashPassword, PasswordSchema } from '@/lib/auth/password';
import { AppError } from '@/lib/http/errors';
import { passwordResetMail, queueMail } from '@/lib/mail';
import { EmailSchema } from './auth';

/** How long a reset link works: 1 hour, ms. */
export const PASSWORD_RESET_TTL_MS = 3600 * 1000;
/** Requests per address per window. */
export const PASSWORD_RESET_LIMIT = 5;
export const PASSWORD_RESET_WINDOW_MS = 3600 * 1000;

export const ResetRequestSchema = z.object({ email: EmailSchema });
export const ResetTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'This reset link is not valid.');
export const ResetSchema = z.object({ token: ResetTokenSchema, password: PasswordSchema });

const hash = (token: string) => createHash('sha256').update(token).digest('hex');

/** Queues a reset mail when the address has an account; answers nothing either way. */
export async function requestPasswordReset(db: Db, input: z.infer<typeof ResetRequestSchema>, baseUrl: string, meta: { ip?: string | null } = {}): Promise<void> {
  const limit = await hitRateLimit(db, `password-reset:${normaliseEmail(input.email)}`, PASSWORD_RESET_WINDOW_MS);
  if (limit.count > PASSWORD_RESET_LIMIT) throw new AppError('rate_limited', 429, 'Too many reset requests for this address. Try again later.');
  const user = await findUserByEmail(db, input.email);
  if (!user) return;
  const token = randomBytes(32).toString('base64url');
  const expiresAt = Date.now() + PASSWORD_RESET_TTL_MS;
  const workshops = await listUserWorkshops(db, user.id);
  const mail = passwordResetMail({ userName: user.name, workshopName: workshops[0]?.name ?? null, resetUrl: `${baseUrl.replace(/\/$/, '')}/reset-password/${token}`, expiresAt });
  await db.transaction(async (tx) => {
    const row = await q.insertPasswordReset(tx, { userId: user.id, tokenHash: hash(token), expiresAt });
    await queueMail(tx, user.email, 'password-reset', mail, workshops[0]?.workshopId ?? null);
    await recordAudit(tx, { workshopId: null, actorId: user.id, action: 'user.password_reset_request', targetType: 'password_reset', targetId: row.id, ip: meta.ip });
  });
}

/** True when the token may still be used (for the page, before the form is sent). */
export async function isResetTokenLive(db: Db, token: string): Promise<boolean> {
  if (!ResetTokenSchema.safeParse(token).success) return false;
  return Boolean(await q.findLivePasswordReset(db, hash(token)));
}

/** Sets the new password and signs the user out everywhere; 404 `reset_invalid` for a used, expired or unknown token. */
export async function resetPassword(db: Db, input: z.infer<typeof ResetSchema>, meta: { ip?: string | null } = {}): Promise<PublicUser> {
  const invalid = () => new AppError('reset_invalid', 404, 'This reset link is not valid any more (used or expired). Ask for a new one.');
  const row = await q.findLivePasswordReset(db, hash(input.token));
  if (!row) throw invalid();
  const passwordHash = await hashPassword(input.password);
  await db.transaction(async (tx) => {
    if (!(await q.markPasswordResetUsed(tx, row.id))) throw invalid();
    await q.expireUserPasswordResets(tx, row.userId);
    await q.setUserPassword(tx, row.userId, passwordHash);
    await revokeUserSessions(tx, row.userId);
    await recordAudit(tx, { workshopId: null, actorId: row.userId, action: 'user.password_reset', targetType: 'user', targetId: row.userId, ip: meta.ip });
  });
  const user = await getUserById(db, row.userId);
  if (!user) throw invalid();
  return toPublicUser(user);
}
