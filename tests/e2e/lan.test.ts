/**
 * LAN use: a workshop runs Gridproof on one machine and opens it from the shop floor at
 * http://<that machine's address>:<port>, plain HTTP. In Debian's chromium (playwright-core) the demo owner
 * signs in over this machine's own non-loopback address (os.networkInterfaces()) and stays signed in: the
 * session cookie is not Secure (a browser keeps no Secure cookie set over plain HTTP on a non-local host,
 * RFC 6265bis §5.7 "Secure" and its localhost exception) and no answer carries Strict-Transport-Security
 * (RFC 6797 §7.2: a host must not send it over plain HTTP). The app server of the e2e project listens on all
 * interfaces (HOST unset), as `npm start` does.
 */
import { networkInterfaces } from 'node:os';
import type { Response as PwResponse } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { launchChromium, type LaunchedChromium } from './chromium';

const port = new URL(inject('baseUrl')).port;

/** This machine's first non-internal IPv4 address (a LAN address), or undefined when it has none. */
function lanAddress(): string | undefined {
  for (const list of Object.values(networkInterfaces())) {
    for (const a of list ?? []) if (a.family === 'IPv4' && !a.internal) return a.address;
  }
  return undefined;
}

const address = lanAddress();
if (!address) console.warn('[lan.test] skipped: this machine has no non-loopback IPv4 address to sign in over');

let browser: LaunchedChromium | undefined;
beforeAll(async () => {
  if (address) browser = await launchChromium({ width: 1280, height: 900 });
});
afterAll(async () => {
  await browser?.close();
});

describe.skipIf(!address)('over the machine\'s own LAN address on plain HTTP', () => {
  it('signs in and stays signed in with a non-Secure session cookie and no HSTS', async () => {
    const base = `http://${address}:${port}`;
    const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
    const page = await browser!.ctx.newPage();
    const answers: PwResponse[] = [];
    page.on('response', (r) => { if (r.url().startsWith(base)) answers.push(r); });

    const first = await page.goto(`${base}/sign-in`);
    expect(first?.status()).toBe(200);
    // the page does not warn that the browser will drop the cookie (it would if the cookie were Secure)
    expect(await page.getByText('your browser will not keep the sign-in cookie').count()).toBe(0);
    await page.getByLabel('E-mail').fill(owner.email);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    const signIn = page.waitForResponse((r) => r.url() === `${base}/api/auth/sign-in` && r.request().method() === 'POST');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    const signedIn = await signIn;
    expect(signedIn.status()).toBe(200);
    const setCookie = (await signedIn.headerValue('set-cookie')) ?? '';
    expect(setCookie).toMatch(/gp_session=/);
    expect(setCookie).not.toMatch(/;\s*secure/i);
    await page.waitForURL(`${base}/`);

    // the browser kept the cookie for this host, not Secure, and a reload is still signed in
    const cookies = await browser!.ctx.cookies(base);
    const session = cookies.find((c) => c.name === 'gp_session');
    expect(session, JSON.stringify(cookies)).toBeDefined();
    expect(session!.secure).toBe(false);
    expect(session!.domain).toBe(address);
    const me = await page.evaluate(async () => (await fetch('/api/me')).status);
    expect(me).toBe(200);
    await page.reload();
    expect(new URL(page.url()).pathname).toBe('/');

    expect(answers.length).toBeGreaterThan(2);
    for (const r of answers) expect(await r.headerValue('strict-transport-security'), r.url()).toBeNull();
    await page.close();
  });
});
