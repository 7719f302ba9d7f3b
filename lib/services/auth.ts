/**
 * Account use cases: sign-up (creates the user, their workshop and their owner membership), sign-in
 * (checks the password; 401 `bad_credentials` without saying which part was wrong; rate-limited per e-mail
 * address), and the schemas of their bodies. Sessions themselves are made by lib/auth/session.ts.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { insertMembership, listUserWorkshops } from '@/db/queries/memberships';
import { hitRateLimit } from '@/db/queries/rate-limits';
import { findUserByEmail, insertUser, normaliseEmail, toPublicUser, type PublicUser } from '@/db/queries/users';
import { insertWorkshop } from '@/db/queries/workshops';
import { hashPassword, PasswordSchema, verifyPassword } from '@/lib/auth/password';
import { AppError, conflict } from '@/lib/http/errors';

export const EmailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address.').max(254));

export const SignUpSchema = z.object({
  email: EmailSchema,
  password: PasswordSchema,
  name: z.string().trim().min(1, 'Enter your name.').max(100),
  workshopName: z.string().trim().min(1, 'Name your workshop.').max(100),
});
export type SignUpInput = z.infer<typeof SignUpSchema>;

export const SignInSchema = z.object({
  email: EmailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof SignInSchema>;

/** Sign-in attempts allowed per e-mail address per window. */
export const SIGN_IN_LIMIT = 20;
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000;

export async function signUp(db: Db, input: SignUpInput, meta: { ip?: string | null } = {}): Promise<{ user: PublicUser; workshopId: string }> {
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
  const limit = await hitRateLimit(db, `sign-in:${normaliseEmail(input.email)}`, SIGN_IN_WINDOW_MS);
  if (limit.count > SIGN_IN_LIMIT) {
    const minutes = Math.max(1, Math.ceil((limit.resetAt - Date.now()) / 60000));
    throw new AppError('rate_limited', 429, `Too many sign-in attempts for this address. Try again in ${minutes} min.`);
  }
  const user = await findUserByEmail(db, input.email);
  const ok = await verifyPassword(input.password, user?.passwordHash);
  if (!user || !ok) throw new AppError('bad_credentials', 401, 'That e-mail address and password do not match an account.');
  const [first] = await listUserWorkshops(db, user.id);
  await recordAudit(db, { workshopId: first?.workshopId ?? null, actorId: user.id, action: 'user.sign_in', targetType: 'user', targetId: user.id, ip: meta.ip });
  return { user: toPublicUser(user), workshopId: first?.workshopId ?? null };
}
