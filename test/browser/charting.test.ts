import { describe, expect, it } from 'vitest';
import { fillByLabel, openBedChart, useBrowser } from '../support/browser.ts';

const browser = useBrowser();

describe('bed chart in a real browser', () => {
  it('a nurse charts an obs and sees it in the obs record and on the chart', async () => {
    const { context, page } = await openBedChart(browser, {
      as: 'nurse@harbourside.example',
      bed: '4-08',
      island: 'obs-entry-form',
    });
    const form = page.getByTestId('obs-entry-form');
    await fillByLabel(form, {
      'SpO₂ (%)': '83',
      'Heart rate (/min)': '112',
      'Respiratory rate (/min)': '26',
      'FiO₂': '45',
      'Systolic BP (mmHg)': '104',
      'Temperature (°C)': '38.3',
    });
    await form.getByLabel('Heart rate (/min)').press('Enter'); // Enter saves
    await page.getByText('Saved', { exact: false }).first().waitFor({ timeout: 15_000 });

    const firstRow = page.getByTestId('obs-record').locator('tbody tr').first();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="obs-record"] tbody tr')?.textContent?.includes('83'),
      null,
      { timeout: 20_000 },
    );
    expect(await firstRow.textContent()).toContain('112');
    await page.waitForFunction(
      () => document.querySelector('[data-testid="latest-spo2"]')?.textContent?.includes('83'),
      null,
      { timeout: 20_000 },
    );
    expect(await page.getByTestId('chart-area').locator('[data-mark="below"]').count()).toBeGreaterThan(0);
    await context.close();
  });

  it("an intensivist orders a new band and the chart's band steps", async () => {
    const { context, page } = await openBedChart(browser, {
      as: 'intensivist@harbourside.example',
      bed: '4-08',
      island: 'order-form',
    });
    // Count the band areas once the chart has drawn its series (before that the count is 0 and any draw would pass).
    await page.getByTestId('chart-summary').waitFor({ state: 'attached', timeout: 20_000 });
    const areasBefore = await page.getByTestId('chart-area').locator('.recharts-reference-area').count();
    const form = page.getByTestId('order-form');
    await form.getByRole('button', { name: /88–92/ }).first().click();
    await form.getByLabel('Reason for this band').fill('Hypercapnia on the morning gas');
    await form.getByLabel('Scale 2').check();
    await form.getByRole('button', { name: 'Order band' }).click();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="current-band"]')?.textContent?.includes('88–92'),
      null,
      { timeout: 20_000 },
    );
    await page.waitForFunction(
      (n) => document.querySelectorAll('[data-testid="chart-area"] .recharts-reference-area').length > n,
      areasBefore,
      { timeout: 30_000 },
    );
    // The reference-area count can also grow by an escalation the sweep raises meanwhile: wait for the band itself.
    await page.waitForFunction(
      () => /band changed/.test(document.querySelector('[data-testid="chart-summary"]')?.textContent ?? ''),
      null,
      { timeout: 30_000 },
    );
    expect(await page.getByTestId('chart-summary').textContent()).toMatch(/band changed/);
    await context.close();
  });
});
