/** Debian's Chromium driven by playwright-core: never a downloaded browser. */
import { chromium, type Browser, type Page } from 'playwright-core';
import { APP_URL, DEMO_PASSWORD } from './app.ts';

export async function launchBrowser(): Promise<Browser> {
  // launch() gives every run a fresh temporary profile; no background networking: there is no network to reach.
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--disable-background-networking', '--disable-component-update',
      '--disable-sync', '--no-first-run'],
  });
}

export async function signInThroughForm(page: Page, email: string, password = DEMO_PASSWORD, base = APP_URL): Promise<void> {
  await page.goto(`${base}/signin`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([page.waitForURL((url) => !url.pathname.startsWith('/signin') || url.search.includes('error')), page.getByRole('button', { name: 'Sign in' }).click()]);
}

/**
 * Waits until the island holding `testId` has hydrated. Islands are server-rendered first, so
 * their forms exist before React has attached to them; acting earlier would race the page.
 */
export async function waitForIsland(page: Page, testId: string, timeout = 20_000): Promise<void> {
  await page.getByTestId(testId).first().waitFor({ timeout });
  await page.waitForFunction((id) => {
    const island = document.querySelector(`[data-testid="${id}"]`)?.closest('astro-island');
    return island !== null && island !== undefined && !island.hasAttribute('ssr');
  }, testId, { timeout });
}
