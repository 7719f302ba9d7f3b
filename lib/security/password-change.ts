/**
 * Changing one's password while signed in: the current password must be given (a borrowed, unlocked session
 * alone cannot take the account over), the new one passes the policy (lib/security/password-policy.ts, with
 * the user's own e-mail and name as words to refuse), and EVERY session of the user is revoked in the same
 * transaction as the new hash, so a copied cookie stops working at once. The route then starts one new
 * session for the caller. Attempts are limited per account (wrong current passwords cost a bcrypt hash).
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { setUserPassword } from '@/db/queries/password-resets';
import { revokeUserSessions } from '@/db/queries/sessions';
import { getUserById } from '@/db/queries/users';
import { hashPassword, PasswordSchema, verifyPassword } from '@/lib/auth/password';
import { invalidInput } from '@/lib/http/errors';
import type { ActorUser } from '@/lib/services/actor';
import { isCommonPassword, PASSWORD_PROBLEM_MESSAGES } from './password-policy';
import { enforce, type RateRule } from './rate-limit';

export const PasswordChangeSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(200),
  newPassword: PasswordSchema,
});
export type PasswordChangeInput = z.infer<typeof PasswordChangeSchema>;

/** Password changes tried per account: 10 per 15 min. */
export const PASSWORD_CHANGE_PER_ACCOUNT: RateRule = { name: 'password-change', limit: 10, windowMs: 15 * 60_000 };

/** Sets a new password and revokes every session of the user; 422 with `fields` for a wrong or weak password. */
export async function changePassword(db: Db, user: ActorUser, input: PasswordChangeInput, meta: { ip?: string | null } = {}): Promise<void> {
  await enforce(db, PASSWORD_CHANGE_PER_ACCOUNT, user.id, 'Too many attempts to change the password.');
  const row = await getUserById(db, user.id);
  if (!row || !(await verifyPassword(input.currentPassword, row.passwordHash))) {
    throw invalidInput('The current password is not right.', { currentPassword: 'Not your current password.' });
  }
  if (isCommonPassword(input.newPassword, { email: row.email, name: row.name })) {
    throw invalidInput('Choose another new password.', { newPassword: PASSWORD_PROBLEM_MESSAGES.common });
  }
  if (await verifyPassword(input.newPassword, row.passwordHash)) {
    throw invalidInput('The new password is the one you have now.', { newPassword: 'Choose a password you have not used here.' });
  }
  const passwordHash = await hashPassword(input.newPassword);
  await db.transaction(async (tx) => {
    await setUserPassword(tx, user.id, passwordHash);
    await revokeUserSessions(tx, user.id);
    await recordAudit(tx, { workshopId: null, actorId: user.id, action: 'user.password_change', targetType: 'user', targetId: user.id, ip: meta.ip });
  });
}
