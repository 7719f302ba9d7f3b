/**
 * The session secret. `SESSION_SECRET` (at least 32 characters, checked with zod) is required when
 * NODE_ENV is "production" and demo mode is off. In development, tests and demo mode, a random secret is
 * generated once into `data/session-secret` (mode 0600) and reused, so sessions survive restarts; it is never
 * a constant in the code. No `server-only` here: `npm start` calls `loadSessionSecret()` before it serves, so
 * a bad configuration stops the start with a clear message.
 */
import { randomBytes } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { z } from 'zod';

export const SessionSecretSchema = z
  .string()
  .min(32, 'SESSION_SECRET must be at least 32 characters (generate one with `openssl rand -base64 48`)');

/** True when Gridproof runs as the demo (`DEMO_MODE=1`): seeded workshop, demo logins on the sign-in page. */
export function isDemoMode(env: NodeJS.ProcessEnv = process.env): boolean {
  return env.DEMO_MODE === '1' || env.DEMO_MODE === 'true';
}

/** Where a generated secret is kept: `data/session-secret` under the working directory. */
export function generatedSecretPath(cwd = process.cwd()): string {
  return resolve(cwd, 'data', 'session-secret');
}

let cached: string | undefined;

/** Returns the session secret, validating `SESSION_SECRET` or creating/reading the generated one. */
export function loadSessionSecret(env: NodeJS.ProcessEnv = process.env): string {
  if (cached) return cached;
  const given = env.SESSION_SECRET;
  if (given !== undefined && given !== '') {
    const parsed = SessionSecretSchema.safeParse(given);
    if (!parsed.success) throw new Error(parsed.error.issues[0]?.message ?? 'SESSION_SECRET is invalid');
    cached = parsed.data;
    return cached;
  }
  if (env.NODE_ENV === 'production' && !isDemoMode(env)) {
    throw new Error('SESSION_SECRET is not set. In production it is required (at least 32 characters); set DEMO_MODE=1 only for a demo.');
  }
  const path = generatedSecretPath();
  try {
    cached = SessionSecretSchema.parse(readFileSync(path, 'utf8').trim());
    return cached;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
  }
  mkdirSync(dirname(path), { recursive: true });
  const secret = randomBytes(48).toString('base64url');
  try {
    writeFileSync(path, secret + '\n', { flag: 'wx', mode: 0o600 });
    cached = secret;
  } catch (err) {
    // Another process won the race: use its secret.
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    cached = SessionSecretSchema.parse(readFileSync(path, 'utf8').trim());
  }
  return cached;
}
