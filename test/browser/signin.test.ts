import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { APP_URL } from '../support/app.ts';
import { launchBrowser, signInThroughForm } from '../support/browser.ts';
import { ROLE_LABELS, type Role } from '../../src/lib/auth/roles.ts';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

// What each demo role must see in its navigation (and must not).
const expectations: Record<string, { sees: string[]; not: string[] }> = {
  nurse: { sees: ['Units', 'My account'], not: ['Staff', 'Audit'] },
  charge: { sees: ['Units'], not: ['Staff', 'Audit'] },
  intensivist: { sees: ['Units'], not: ['Staff', 'Audit'] },
  outreach: { sees: ['Units'], not: ['Staff', 'Audit'] },
  admin: { sees: ['Staff', 'Units and beds', 'Audit', 'My account'], not: ['Ward board', 'Outreach queue'] },
};

describe('signing in through the real form', () => {
  for (const [role, { sees, not }] of Object.entries(expectations)) {
    it(`${role} signs in and sees their own navigation`, async () => {
      const context = await browser.newContext();
      const page = await context.newPage();
      await signInThroughForm(page, `${role}@harbourside.example`);
      const nav = page.getByTestId('main-nav');
      for (const label of sees)
        await nav.getByRole('link', { name: label }).waitFor({ state: 'visible', timeout: 10_000 });
      for (const label of not) expect(await nav.getByRole('link', { name: label }).count()).toBe(0);
      expect(await page.getByTestId('whoami').textContent()).toContain(ROLE_LABELS[role as Role]);
      await context.close();
    });
  }

  it('a signed-out visit to a page lands on sign-in, and returns there after signing in', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(`${APP_URL}/admin/users`);
    expect(new URL(page.url()).pathname).toBe('/signin');
    await page.getByLabel('Email').fill('admin@harbourside.example');
    await page.getByLabel('Password').fill('ebbwatch-demo');
    await Promise.all([
      page.waitForURL(`${APP_URL}/admin/users`),
      page.getByRole('button', { name: 'Sign in' }).click(),
    ]);
    await page.getByTestId('user-table').waitFor({ state: 'visible', timeout: 10_000 });
    await context.close();
  });

  it('says plainly when the password is wrong, and works at localhost too', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await signInThroughForm(page, 'nurse@harbourside.example', 'wrong-password');
    expect(await page.getByTestId('signin-error').textContent()).toContain('do not match');
    await signInThroughForm(page, 'nurse@harbourside.example', undefined, APP_URL.replace('127.0.0.1', 'localhost'));
    expect(new URL(page.url()).pathname).toBe('/');
    await context.close();
  });

  it('night mode persists across pages and sign-out returns to sign-in', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await signInThroughForm(page, 'charge@harbourside.example');
    await page.getByTestId('night-toggle').click();
    await page.waitForLoadState('load');
    expect(await page.locator('html').getAttribute('class')).toContain('night');
    await page.goto(`${APP_URL}/`);
    expect(await page.locator('html').getAttribute('class')).toContain('night');
    await Promise.all([page.waitForURL(/\/signin/), page.getByRole('button', { name: 'Sign out' }).click()]);
    await page.goto(`${APP_URL}/`);
    expect(new URL(page.url()).pathname).toBe('/signin');
    await context.close();
  });
});
