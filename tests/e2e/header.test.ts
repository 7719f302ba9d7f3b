/**
 * The signed-in header at a desktop width and on a phone, with the longest navigation (an owner in demo mode,
 * who also sees the development outbox): at 1280 px every link stands in one row beside the brand; at 390 px
 * the header is one short row with a Menu button, and the menu opens the links and the account and closes
 * when a link is followed. 390 × 844 is a common phone viewport (common practice).
 */
import { type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_LOGINS, DEMO_PASSWORD } from '@/lib/services/demo-accounts';
import { launchChromium, type LaunchedChromium } from './chromium';
import { signInThroughForm } from './session';

const baseUrl = inject('baseUrl');
const LINKS = ['Beds', 'Members', 'Accessories', 'Photo guide', 'Outbox'];
let browser: LaunchedChromium | undefined;

beforeAll(async () => {
  browser = await launchChromium({ width: 1280, height: 900 });
});
afterAll(async () => {
  await browser?.close();
});

async function signedInPage(width: number, height: number): Promise<Page> {
  const ctx = browser!.ctx;
  await ctx.clearCookies();
  const page = await ctx.newPage();
  await page.setViewportSize({ width, height });
  const owner = DEMO_LOGINS.find((l) => l.role === 'owner')!;
  await signInThroughForm(page, { email: owner.email, password: DEMO_PASSWORD });
  return page;
}

const headerBox = async (page: Page) => (await page.getByTestId('app-header').boundingBox())!;

describe('the header', () => {
  it('stands in one row at 1280 px, with the account in a drop-down', async () => {
    const page = await signedInPage(1280, 900);
    const nav = page.getByRole('navigation', { name: 'Main' });
    const tops = await Promise.all(LINKS.map(async (name) => (await nav.getByRole('link', { name, exact: true }).boundingBox())!.y));
    expect(new Set(tops.map((y) => Math.round(y))).size).toBe(1);
    expect((await headerBox(page)).height).toBeLessThan(90);
    expect(await page.getByRole('button', { name: 'Sign out' }).isVisible()).toBe(false);
    await page.getByLabel('Account', { exact: true }).click();
    expect(await page.getByRole('button', { name: 'Sign out' }).isVisible()).toBe(true);
    await page.keyboard.press('Escape');
    await expect.poll(() => page.getByRole('button', { name: 'Sign out' }).isVisible()).toBe(false);
    await page.close();
  });

  it('is one short row on a phone, and its menu opens the links and closes on the way', async () => {
    const page = await signedInPage(390, 844);
    const header = await headerBox(page);
    expect(header.height).toBeLessThan(844 / 8);
    expect(header.width).toBeLessThanOrEqual(390);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    const nav = page.getByRole('navigation', { name: 'Main' });
    expect(await nav.getByRole('link', { name: 'Members', exact: true }).isVisible()).toBe(false);
    await page.getByLabel('Menu', { exact: true }).click();
    for (const name of LINKS) expect(await nav.getByRole('link', { name, exact: true }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Sign out' }).isVisible()).toBe(true);
    await nav.getByRole('link', { name: 'Members', exact: true }).click();
    await page.waitForURL(`${baseUrl}/members`);
    await expect.poll(() => nav.getByRole('link', { name: 'Members', exact: true }).isVisible()).toBe(false);
    await page.close();
  });
});
