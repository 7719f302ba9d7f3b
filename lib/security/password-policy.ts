/**
 * Password policy for sign-up, reset and change: at least `PASSWORD_MIN_LENGTH` characters (NIST SP 800-63B
 * §5.1.1.2 asks for at least 8 and a check against commonly used or compromised values; 10 here), at most
 * 72 UTF-8 bytes (bcrypt reads no more), and not a common password. "Common" means: after lower-casing,
 * stripping the digits and symbols tacked on at either end, and undoing letter-for-digit swaps, the result
 * is on the shipped list (lib/security/common-passwords.ts), is one character repeated, is a run along the
 * keyboard or the alphabet, or is the user's own e-mail name or the app's name. No composition rules (the
 * same NIST section advises against them).
 */
import { COMMON_PASSWORDS } from './common-passwords';

export const PASSWORD_MIN_LENGTH = 10;
/** bcrypt reads at most 72 bytes of its input. */
export const PASSWORD_MAX_BYTES = 72;

const LIST = new Set(COMMON_PASSWORDS);

/** Letter-for-digit swaps people use to "harden" a word (common practice, from memory). */
const SWAPS: Record<string, string> = { '0': 'o', '1': 'i', '3': 'e', '4': 'a', '5': 's', '7': 't', '8': 'b', '9': 'g', '@': 'a', '$': 's', '!': 'i', '|': 'l', '+': 't' };

/** Rows a finger runs along, and the alphabet; a password inside one of them (either way) is a run. */
const RUNS = ['1234567890', 'qwertyuiop', 'asdfghjkl', 'zxcvbnm', 'qwertzuiop', 'azertyuiop', 'abcdefghijklmnopqrstuvwxyz'];

function variants(password: string): Set<string> {
  const lower = password.normalize('NFKC').toLowerCase();
  const compact = lower.replace(/[\s._-]+/g, '');
  const out = new Set<string>();
  const strip = (v: string) => v.replace(/^[^a-z]+/, '').replace(/[^a-z]+$/, '');
  const swap = (v: string) => [...v].map((c) => SWAPS[c] ?? c).join('');
  for (const v of [lower, compact]) {
    // "P4ssw0rd2024": strip the tacked-on digits first, then undo the swaps inside the word
    for (const w of [v, strip(v), swap(v), strip(swap(v)), swap(strip(v))]) if (w) out.add(w);
  }
  return out;
}

function isRun(v: string): boolean {
  if (v.length < 4) return false;
  if (new Set(v).size === 1) return true;
  return RUNS.some((r) => r.includes(v) || [...r].reverse().join('').includes(v));
}

/** True when `password` is common in the sense of the module header. `context` adds the user's own words. */
export function isCommonPassword(password: string, context: { email?: string | null; name?: string | null } = {}): boolean {
  const own = new Set<string>();
  const local = context.email?.split('@')[0]?.toLowerCase().replace(/[\s._-]+/g, '');
  if (local && local.length >= 3) own.add(local);
  const name = context.name?.toLowerCase().replace(/[\s._-]+/g, '');
  if (name && name.length >= 3) own.add(name);
  for (const v of variants(password)) {
    if (LIST.has(v) || isRun(v) || own.has(v)) return true;
    // a common word said twice ("passwordpassword") is still that word
    const half = v.length % 2 === 0 ? v.slice(0, v.length / 2) : '';
    if (half && half + half === v && (LIST.has(half) || own.has(half) || isRun(half))) return true;
  }
  return false;
}

export type PasswordProblem = 'too-short' | 'too-long' | 'common';

/** The first problem with `password`, or null when it is acceptable. */
export function passwordProblem(password: string, context: { email?: string | null; name?: string | null } = {}): PasswordProblem | null {
  if ([...password].length < PASSWORD_MIN_LENGTH) return 'too-short';
  if (Buffer.byteLength(password, 'utf8') > PASSWORD_MAX_BYTES) return 'too-long';
  if (isCommonPassword(password, context)) return 'common';
  return null;
}

/** Words for each problem, for the `fields.password` of an error. Never contains the password. */
export const PASSWORD_PROBLEM_MESSAGES: Record<PasswordProblem, string> = {
  'too-short': `Use at least ${PASSWORD_MIN_LENGTH} characters.`,
  'too-long': `Use at most ${PASSWORD_MAX_BYTES} bytes (bcrypt reads no more).`,
  common: 'This password is too common or too easy to guess; a few unrelated words make a strong one.',
};
