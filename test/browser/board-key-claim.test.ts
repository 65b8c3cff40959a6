/**
 * Issue 10 point 5: the board's key, claim from the tile, assignment confirmed in words, tiles that
 * do not jump while keyboard focus is inside the board, and polite announcements.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { signedIn } from '../support/app.ts';
import { openSignedIn, useBrowser } from '../support/browser.ts';
import { demoPatientId } from '../support/pages.ts';

const browser = useBrowser();
let patientId: number;
beforeAll(async () => {
  patientId = await demoPatientId('4-11');
});

const order = (page: import('playwright-core').Page) =>
  page
    .getByTestId('board-tiles')
    .locator('li')
    .evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));

describe('ward board: key, claim, assignment, steady order', () => {
  it('a charge nurse reads the key, assigns with a confirmation, claims from the tile; tiles hold still while focus is inside', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'charge@harbourside.example',
      path: '/board',
      island: 'board-tiles',
    });

    // The key: on demand on screen, always in print.
    await page.getByText('Key to colours and shapes').click();
    expect(await page.getByTestId('board-key').textContent()).toContain('Below band — coral, chevron down');
    expect(await page.getByTestId('board-key-print').count()).toBe(1);

    // Assigning a nurse is confirmed in words.
    const select = page.getByLabel('Nurse for bed 4-05');
    const choice = await select.locator('option').nth(1).textContent();
    await select.selectOption({ index: 1 });
    await page
      .getByTestId('board-notice')
      .filter({ hasText: `Bed 4-05: ${choice} assigned.` })
      .waitFor({ timeout: 15_000 });

    // Focus inside the board: a bed that becomes the top concern keeps its place until focus leaves.
    await page.getByLabel('Nurse for bed 4-04').focus();
    expect(await page.getByTestId('board-tiles').getAttribute('data-order-held')).toBe('yes');
    const before = await order(page);
    const nurse = await signedIn('charge@harbourside.example');
    for (const minsAgo of [1, 0]) {
      // after the seeded monitor readings: two charted obs below band in a row
      const res = await nurse.post(`/api/patients/${patientId}/observations`, {
        takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(),
        spo2: 84,
        heartRate: 96,
        respRate: 24,
        device: 'nasal_cannula',
        flowLpm: 2,
        trace: 'clean',
        systolic: 120,
        temperature: 37,
        consciousness: 'alert',
      });
      expect(res.status).toBe(201);
    }
    const tile = page.getByTestId('tile-4-11');
    await tile.getByTestId('tile-escalation').waitFor({ timeout: 30_000 }); // the poll brought the new data
    expect(await order(page)).toEqual(before);
    expect(await page.getByTestId('board-announcer').textContent()).toContain('Bed 4-11');

    // Claim from the tile; the words confirm it, and the tile then names who claimed.
    await tile.getByTestId('tile-claim').click();
    await page
      .getByTestId('board-notice')
      .filter({ hasText: 'Bed 4-11: you claimed the' })
      .waitFor({ timeout: 15_000 });
    await page.waitForFunction(
      () =>
        document
          .querySelector('[data-testid="tile-4-11"] [data-testid="tile-escalation"]')
          ?.textContent?.includes('claimed by'),
      null,
      { timeout: 30_000 },
    );

    // Focus leaves the board: the concern order returns and the bed moves up.
    await page.locator('h1').click();
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.waitForFunction(
      () => document.querySelector('[data-testid="board-tiles"]')?.getAttribute('data-order-held') === 'no',
      null,
      { timeout: 20_000 },
    );
    await page.waitForFunction(
      () => document.querySelector('[data-testid="board-tiles"] li')?.getAttribute('data-testid') !== null,
      null,
    );
    const after = await order(page);
    expect(after.indexOf('tile-4-11')).toBeLessThan(before.indexOf('tile-4-11'));
    await context.close();
  });
});
