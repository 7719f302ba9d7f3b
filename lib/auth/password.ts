/**
 * Password hashing with bcryptjs (cost 11). bcrypt reads at most 72 bytes, so longer passwords are refused
 * rather than silently truncated. `verifyPassword` against no user still spends the same time (dummy hash),
 * so sign-in does not reveal which e-mail addresses have accounts.
 */
import bcrypt from 'bcryptjs';
import { z } from 'zod';
import { PASSWORD_PROBLEM_MESSAGES, passwordProblem } from '@/lib/security/password-policy';

export const BCRYPT_COST = 11;

/** A new password: the rules of lib/security/password-policy.ts (length in characters, bcrypt's 72 bytes, common passwords). */
export const PasswordSchema = z.string().superRefine((p, ctx) => {
  const problem = passwordProblem(p);
  if (problem) ctx.addIssue({ code: 'custom', message: PASSWORD_PROBLEM_MESSAGES[problem] });
});

// A hash of a random string, made once per process; compared against when no user matches.
let dummyHash: Promise<string> | undefined;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

/** Compares `password` with `hash`; with `hash` null it burns the same time and answers false. */
export async function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  if (!hash) {
    dummyHash ??= bcrypt.hash(crypto.randomUUID(), BCRYPT_COST);
    await bcrypt.compare(password, await dummyHash);
    return false;
  }
  return bcrypt.compare(password, hash);
}
