/**
 * Password policy. Length rule after NIST SP 800-63B §5.1.1.2 (at least 8, we ask 10; no composition rules;
 * compare against commonly used values). The bcrypt 72-byte input limit is from the bcrypt paper (Provos &
 * Mazières 1999: the key schedule takes up to 72 bytes).
 */
import { describe, expect, it } from 'vitest';
import { PasswordSchema } from '@/lib/auth/password';
import { SignUpSchema } from '@/lib/services/auth';
import { isCommonPassword, PASSWORD_MIN_LENGTH, passwordProblem } from '@/lib/security/password-policy';

describe('password policy', () => {
  it('refuses passwords shorter than the minimum and accepts a long passphrase', () => {
    expect(PASSWORD_MIN_LENGTH).toBeGreaterThanOrEqual(8); // NIST SP 800-63B floor
    expect(passwordProblem('short one')).toBe('too-short');
    expect(passwordProblem('ten chars!')).toBeNull();
    expect(passwordProblem('violet kettle under the lathe')).toBeNull();
  });

  it('counts characters, not bytes, for the minimum, and bytes for the bcrypt maximum', () => {
    expect(passwordProblem('ééééééééé')).toBe('too-short'); // 9 characters, 18 bytes
    expect(passwordProblem('é'.repeat(37))).toBe('too-long'); // 74 bytes > 72
    expect(passwordProblem('é'.repeat(36))).toBe('common'); // 72 bytes, but one character repeated
    // the sign-up schema applies the same rule: five characters that JavaScript stores as ten code units are too short
    expect(PasswordSchema.safeParse('🔩🪚🔧🪛🧰').success).toBe(false);
    expect(PasswordSchema.safeParse('é'.repeat(37)).error?.issues[0]?.message).toMatch(/at most 72 bytes/);
  });

  it('refuses the most common passwords and their usual disguises', () => {
    for (const p of ['1234567890', 'qwertyuiop', 'password123', 'Password123!', 'P4ssw0rd2024', 'iloveyou12', 'letmein!!!!', 'passwordpassword',
      'aaaaaaaaaaaa', 'zyxwvutsrqpo', '0987654321', 'Spoilboard2025', 'gridproof!!']) {
      expect(isCommonPassword(p), p).toBe(true);
    }
  });

  it('refuses the user\'s own e-mail name or name as the password', () => {
    expect(isCommonPassword('jane.carver99', { email: 'jane.carver@example.com' })).toBe(true);
    expect(isCommonPassword('Harriet Oakes', { name: 'harriet oakes' })).toBe(true);
    expect(isCommonPassword('jane.carver99', { email: 'someone@example.com' })).toBe(false);
  });

  it('applies at sign-up through the schemas, with a message that never repeats the password', () => {
    const weak = PasswordSchema.safeParse('Password123!');
    expect(weak.success).toBe(false);
    expect(JSON.stringify(weak.error?.issues)).not.toContain('Password123!');
    const own = SignUpSchema.safeParse({ email: 'mira.lindqvist@example.test', password: 'mira.lindqvist', name: 'Mira', workshopName: 'W' });
    expect(own.success).toBe(false);
    expect(own.error?.issues[0]?.path).toEqual(['password']);
    expect(SignUpSchema.safeParse({ email: 'mira@example.test', password: 'copper fence over nine', name: 'Mira', workshopName: 'W' }).success).toBe(true);
  });
});
