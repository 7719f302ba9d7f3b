/**
 * The app in Debian's chromium (playwright-core, no browser download): sign up, sign out, sign in; a
 * reviewer sees no way to add a bed and the server refuses one posted from the page; another workshop's
 * bed page is a 404; the colours follow the device's light or dark preference until the theme button picks one,
 * and the pick outlives a reload.
 */
import { type BrowserContext, type Page } from 'playwright-core';
import { launchChromium, type LaunchedChromium } from './chromium';
import { signInThroughForm } from './session';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { Client, E2E_PASSWORD, e2eEmail } from './client';

const baseUrl = inject('baseUrl');
let browser: LaunchedChromium | undefined;
let ctx: BrowserContext;

beforeAll(async () => {
  browser = await launchChromium({ width: 412, height: 900 }); // a phone held in the shop
  ctx = browser.ctx;
});
afterAll(async () => {
  await browser?.close();
});

async function freshPage(): Promise<Page> {
  await ctx.clearCookies();
  return ctx.newPage();
}

describe('in the browser', () => {
  it('signs up, signs out and signs in again', async () => {
    const page = await freshPage();
    const email = e2eEmail('browser');
    await page.goto(`${baseUrl}/sign-up`);
    await page.getByLabel('Your name').fill('Bench Hand');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill(E2E_PASSWORD);
    await page.getByLabel('Workshop name').fill('Quayside Frames');
    await page.getByRole('button', { name: 'Create workshop' }).click();
    await page.waitForURL(`${baseUrl}/`);
    await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('Quayside Frames');
    expect(await page.getByText('No beds yet').isVisible()).toBe(true);

    // on a phone, sign-out sits in the header's menu
    await page.getByLabel('Menu', { exact: true }).click();
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in\?signed-out=1$/);
    expect(await page.getByText('You are signed out.').isVisible()).toBe(true);
    await page.goto(`${baseUrl}/`);
    await page.waitForURL(`${baseUrl}/sign-in`);

    await signInThroughForm(page, { email, password: E2E_PASSWORD });
    await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('Quayside Frames');
    await page.close();
  });

  it('shows the demo logins and wrong-password message on the sign-in page', async () => {
    const page = await freshPage();
    await page.goto(`${baseUrl}/sign-in`);
    for (const l of DEMO_LOGINS) expect(await page.getByText(l.email).isVisible()).toBe(true);
    await page.getByLabel('E-mail').fill(DEMO_LOGINS[0]!.email);
    await page.getByLabel('Password').fill('not the password');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await expect.poll(() => page.getByRole('alert').filter({ hasText: 'do not match' }).count()).toBe(1);
    await page.close();
  });

  it('gives a reviewer no bed form, and the server refuses a bed posted from the page', async () => {
    const reviewer = DEMO_LOGINS.find((l) => l.role === 'reviewer')!;
    const page = await freshPage();
    await signInThroughForm(page, { email: reviewer.email, password: DEMO_PASSWORD });
    await expect.poll(() => page.getByRole('list', { name: 'Beds' }).isVisible()).toBe(true);
    expect(await page.getByRole('form', { name: 'Add a bed' }).count()).toBe(0);
    const status = await page.evaluate(async () => {
      const res = await fetch('/api/beds', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'Sneaky', preset: 'm6-50' }) });
      return res.status;
    });
    expect(status).toBe(403);
    await page.close();
  });

  it("shows a 404 page for another workshop's bed", async () => {
    const owner = new Client();
    await owner.req('POST', '/api/auth/sign-in', { email: DEMO_LOGINS[0]!.email, password: DEMO_PASSWORD });
    const bedId = ((await owner.req('GET', '/api/beds')).json as { beds: { id: string }[] }).beds[0]!.id;

    const page = await freshPage();
    const email = e2eEmail('outsider');
    const api = new Client();
    expect((await api.req('POST', '/api/auth/sign-up', { email, password: E2E_PASSWORD, name: 'Outsider', workshopName: 'Other Yard' })).status).toBe(201);
    await signInThroughForm(page, { email, password: E2E_PASSWORD });
    const res = await page.goto(`${baseUrl}/beds/${bedId}`);
    expect(res?.status()).toBe(404);
    expect(await page.getByRole('heading', { name: 'Not found' }).isVisible()).toBe(true);
    await page.close();
  });

  it('follows the device theme until one is picked, and keeps the pick after a reload', async () => {
    const page = await freshPage();
    const PAPER = 'rgb(245, 243, 236)'; // --paper, light
    const SLATE = 'rgb(18, 20, 22)'; // --paper, dark
    const ground = () => page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
    await page.emulateMedia({ colorScheme: 'dark' });
    await page.goto(`${baseUrl}/sign-in`);
    await page.evaluate(() => localStorage.removeItem('gp-theme'));
    await page.reload();
    expect(await ground()).toBe(SLATE);
    await page.emulateMedia({ colorScheme: 'light' });
    expect(await ground()).toBe(PAPER);
    const toggle = page.getByRole('button', { name: /Change theme/ });
    await toggle.click(); // device → light
    await expect.poll(ground).toBe(PAPER);
    await page.emulateMedia({ colorScheme: 'dark' });
    expect(await ground()).toBe(PAPER); // picked light holds against a dark device
    await toggle.click(); // light → dark
    await expect.poll(ground).toBe(SLATE);
    await page.emulateMedia({ colorScheme: 'light' });
    await page.reload();
    expect(await ground()).toBe(SLATE); // the pick is kept (localStorage, applied before paint)
    await page.getByRole('button', { name: /Change theme/ }).click(); // dark → device
    await expect.poll(ground).toBe(PAPER);
    await page.evaluate(() => localStorage.removeItem('gp-theme'));
    await page.close();
  });
});
