/**
 * Debian's Chromium for the browser tests, driven by playwright-core (never a downloaded browser). Each launch
 * gets a fresh profile folder, removed again by `close()`.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

/** Flags for a headless run as root on a machine with no network beyond loopback. */
export const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];

export interface LaunchedChromium {
  ctx: BrowserContext;
  /** Closes the browser and removes its profile folder. */
  close: () => Promise<void>;
}

/** Starts headless Chromium with a fresh profile and the given viewport (CSS px); `javaScript: false` for a reader without it. */
export async function launchChromium(viewport: { width: number; height: number }, opts: { javaScript?: boolean } = {}): Promise<LaunchedChromium> {
  const profile = mkdtempSync(join(tmpdir(), 'gridproof-chromium-'));
  try {
    const ctx = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_ARGS, viewport, javaScriptEnabled: opts.javaScript ?? true });
    return {
      ctx,
      close: async () => {
        await ctx.close();
        rmSync(profile, { recursive: true, force: true });
      },
    };
  } catch (e) {
    rmSync(profile, { recursive: true, force: true });
    throw e;
  }
}
