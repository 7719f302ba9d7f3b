/**
 * Account use cases: sign-up (creates the user, their workshop and their owner membership), sign-in
 * (checks the password; 401 `bad_credentials` without saying which part was wrong; limited per address and
 * account pair, never locking the account itself: lib/security/rate-limit.ts), and the schemas of their bodies. Sessions themselves are made by lib/auth/session.ts.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { insertMembership, listUserWorkshops } from '@/db/queries/memberships';
import { findUserByEmail, insertUser, toPublicUser, type PublicUser } from '@/db/queries/users';
import { insertWorkshop } from '@/db/queries/workshops';
import { hashPassword, PasswordSchema, verifyPassword } from '@/lib/auth/password';
import { AppError, conflict } from '@/lib/http/errors';
import { isCommonPassword, PASSWORD_PROBLEM_MESSAGES } from '@/lib/security/password-policy';
import { assertSignInAllowed, assertSignUpAllowed, signInSucceeded } from '@/lib/security/rate-limit';

export const EmailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address.').max(254));

export const SignUpSchema = z.object({
  email: EmailSchema,
  password: PasswordSchema,
  name: z.string().trim().min(1, 'Enter your name.').max(100),
  workshopName: z.string().trim().min(1, 'Name your workshop.').max(100),
}).refine((v) => !isCommonPassword(v.password, { email: v.email, name: v.name }), { path: ['password'], message: PASSWORD_PROBLEM_MESSAGES.common });
export type SignUpInput = z.infer<typeof SignUpSchema>;

export const SignInSchema = z.object({
  email: EmailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof SignInSchema>;

export async function signUp(db: Db, input: SignUpInput, meta: { ip?: string | null } = {}): Promise<{ user: PublicUser; workshopId: string }> {
  await assertSignUpAllowed(db, meta.ip);
  if (await findUserByEmail(db, input.email)) throw conflict('An account with this e-mail address exists; sign in instead.', { email: 'Already registered.' });
  const passwordHash = await hashPassword(input.password);
  try {
    return await db.transaction(async (tx) => {
      const user = await insertUser(tx, { email: input.email, name: input.name, passwordHash });
      const workshop = await insertWorkshop(tx, { name: input.workshopName });
      await insertMembership(tx, { workshopId: workshop.id, userId: user.id, role: 'owner' });
      await recordAudit(tx, { workshopId: workshop.id, actorId: user.id, action: 'user.sign_up', targetType: 'user', targetId: user.id, ip: meta.ip });
      return { user: toPublicUser(user), workshopId: workshop.id };
    });
  } catch (err) {
    if (String((err as Error).message).includes('UNIQUE')) throw conflict('An account with this e-mail address exists; sign in instead.', { email: 'Already registered.' });
    throw err;
  }
}

export async function signIn(db: Db, input: SignInInput, meta: { ip?: string | null } = {}): Promise<{ user: PublicUser; workshopId: string | null }> {
  // per (address, account) pair and per address, shared by every web instance (lib/security/rate-limit.ts)
  await assertSignInAllowed(db, { email: input.email, ip: meta.ip });
  const user = await findUserByEmail(db, input.email);
  const ok = await verifyPassword(input.password, user?.passwordHash);
  if (!user || !ok) throw new AppError('bad_credentials', 401, 'That e-mail address and password do not match an account.');
  await signInSucceeded(db, { email: input.email, ip: meta.ip });
  const [first] = await listUserWorkshops(db, user.id);
  await recordAudit(db, { workshopId: first?.workshopId ?? null, actorId: user.id, action: 'user.sign_in', targetType: 'user', targetId: user.id, ip: meta.ip });
  return { user: toPublicUser(user), workshopId: first?.workshopId ?? null };
}
