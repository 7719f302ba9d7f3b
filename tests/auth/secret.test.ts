import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';

// Each test imports a fresh copy of the module (it caches the secret) in a temp working directory.
let dir: string;
let cwd: string;
beforeEach(() => {
  cwd = process.cwd();
  dir = mkdtempSync(join(tmpdir(), 'gridproof-secret-'));
  process.chdir(dir);
  vi.resetModules();
});
afterEach(() => {
  process.chdir(cwd);
  rmSync(dir, { recursive: true, force: true });
});
const load = async () => (await import('@/lib/auth/secret')).loadSessionSecret;

describe('session secret', () => {
  it('refuses a SESSION_SECRET shorter than 32 characters', async () => {
    const loadSessionSecret = await load();
    expect(() => loadSessionSecret({ SESSION_SECRET: 'x'.repeat(31), NODE_ENV: 'production' })).toThrow(/at least 32/);
  });

  it('uses a valid SESSION_SECRET as given', async () => {
    const loadSessionSecret = await load();
    expect(loadSessionSecret({ SESSION_SECRET: 's'.repeat(40), NODE_ENV: 'production' })).toBe('s'.repeat(40));
  });

  it('requires SESSION_SECRET in production outside demo mode', async () => {
    const loadSessionSecret = await load();
    expect(() => loadSessionSecret({ NODE_ENV: 'production' })).toThrow(/SESSION_SECRET is not set/);
  });

  it('generates a random secret once into data/ (owner-only) and reuses it', async () => {
    const first = (await load())({ NODE_ENV: 'production', DEMO_MODE: '1' });
    expect(first.length).toBeGreaterThanOrEqual(32);
    const file = join(dir, 'data', 'session-secret');
    expect(readFileSync(file, 'utf8').trim()).toBe(first);
    expect(statSync(file).mode & 0o077).toBe(0);
    vi.resetModules();
    expect((await load())({ NODE_ENV: 'development' })).toBe(first);
    rmSync(file);
    vi.resetModules();
    expect((await load())({ NODE_ENV: 'development' })).not.toBe(first);
  });
});
