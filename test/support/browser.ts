/** Debian's Chromium driven by playwright-core: never a downloaded browser. */
import { afterAll, beforeAll } from 'vitest';
import {
  chromium,
  type Browser,
  type BrowserContext,
  type BrowserContextOptions,
  type Locator,
  type Page,
} from 'playwright-core';
import { APP_URL, DEMO_PASSWORD } from './app.ts';
import { demoPatientId } from './pages.ts';

export async function launchBrowser(): Promise<Browser> {
  // launch() gives every run a fresh temporary profile; no background networking: there is no network to reach.
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
}

/** What a test file uses of its browser: fresh contexts, each with its own cookies. */
export type TestBrowser = Pick<Browser, 'newContext'>;

/**
 * One Chromium for a test file, launched before its tests and closed after them. Call at the top of
 * the file; the value returned may be used at once in tests and later hooks.
 */
export function useBrowser(): TestBrowser {
  let browser: Browser | undefined;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });
  return { newContext: (options) => browser!.newContext(options) };
}

export async function signInThroughForm(
  page: Page,
  email: string,
  password = DEMO_PASSWORD,
  base = APP_URL,
): Promise<void> {
  await page.goto(`${base}/signin`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([
    page.waitForURL((url) => !url.pathname.startsWith('/signin') || url.search.includes('error')),
    page.getByRole('button', { name: 'Sign in' }).click(),
  ]);
}

/**
 * Waits until the island holding `testId` has hydrated. Islands are server-rendered first, so
 * their forms exist before React has attached to them; acting earlier would race the page.
 */
export async function waitForIsland(page: Page, testId: string, timeout = 20_000): Promise<void> {
  await page.getByTestId(testId).first().waitFor({ timeout });
  await page.waitForFunction(
    (id) => {
      const island = document.querySelector(`[data-testid="${id}"]`)?.closest('astro-island');
      return island !== null && island !== undefined && !island.hasAttribute('ssr');
    },
    testId,
    { timeout },
  );
}

export interface OpenOptions {
  /** A demo address (the demo password), or a fixture user with its own password. */
  as: string | { email: string; password: string };
  /** The page to open once signed in (after APP_URL); left out, the page stays where sign-in led. */
  path?: string;
  /** A test id whose island must have hydrated before the test acts. */
  island?: string;
  context?: BrowserContextOptions;
}

/** A fresh context (its own cookies) signed in through the form, optionally on a page with its island ready. The test closes the context. */
export async function openSignedIn(
  browser: TestBrowser,
  o: OpenOptions,
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext(o.context);
  const page = await context.newPage();
  const who = typeof o.as === 'string' ? { email: o.as, password: DEMO_PASSWORD } : o.as;
  await signInThroughForm(page, who.email, who.password);
  if (o.path !== undefined) await page.goto(`${APP_URL}${o.path}`);
  if (o.island !== undefined) await waitForIsland(page, o.island);
  return { context, page };
}

/** The bed chart of the demo patient in demo bed `bed`, opened as `openSignedIn` opens a page; with that patient's id. */
export async function openBedChart(browser: TestBrowser, o: Omit<OpenOptions, 'path'> & { bed: string }) {
  const patientId = await demoPatientId(o.bed);
  return { ...(await openSignedIn(browser, { ...o, path: `/patients/${patientId}` })), patientId };
}

/** Opens a page through the main navigation, as a person would, and waits until the address is the page's. */
export async function followNav(page: Page, link: string, path: string): Promise<void> {
  await page.getByTestId('main-nav').getByRole('link', { name: link }).click();
  await page.waitForURL(`${APP_URL}${path}`);
}

/** Types each value into the field with that label, in order, inside `scope` (a form, or the page). */
export async function fillByLabel(scope: Page | Locator, values: Record<string, string>): Promise<void> {
  for (const [label, value] of Object.entries(values)) await scope.getByLabel(label).fill(value);
}
