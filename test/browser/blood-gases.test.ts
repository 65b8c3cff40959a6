import { describe, expect, it } from 'vitest';
import { APP_URL } from '../support/app.ts';
import { fillByLabel, openBedChart, useBrowser, waitForIsland } from '../support/browser.ts';

const browser = useBrowser();

describe('blood gases in a real browser', () => {
  it('a nurse charts a gas whose SaO₂ is 85 % while SpO₂ read 94 %: occult hypoxaemia shows on the bed chart and the board', async () => {
    const { context, page, patientId } = await openBedChart(browser, {
      as: 'nurse@harbourside.example',
      bed: '4-11',
      island: 'bed-chart',
    });
    await waitForIsland(page, 'gas-form');
    const form = page.getByTestId('gas-form');
    await fillByLabel(form, {
      'SpO₂ on the monitor (%)': '94',
      pH: '7.34',
      'SaO₂ (%) co-oximetry': '85',
      'PaO₂ (kPa)': '7.0',
      'PaCO₂ (kPa)': '6.2',
      'FiO₂ at sampling': '28',
    });
    await form.getByRole('button', { name: 'Save blood gas' }).click();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="gas-status"]')?.textContent?.includes('occult hypoxaemia'),
      null,
      { timeout: 20_000 },
    );

    // The table row, the chart mark, the bedside task above the chart and the bias beside the band.
    await page.waitForFunction(
      () => document.querySelector('[data-testid="gas-table"] tbody tr[data-occult]') !== null,
      null,
      { timeout: 20_000 },
    );
    const row = page.getByTestId('gas-table').locator('tbody tr[data-occult]').first();
    expect(await row.textContent()).toContain('SaO₂ 85 %');
    expect(await row.textContent()).toContain('SpO₂ 94 %');
    expect(await row.textContent()).toContain('Occult hypoxaemia');
    await page.waitForFunction(
      () =>
        document.querySelector('[data-testid="chart-area"] [data-mark="extra"][data-flag="occult hypoxaemia"]') !==
        null,
      null,
      { timeout: 30_000 },
    );
    await page.waitForFunction(
      () => document.querySelector('[data-testid="patient-escalations"]')?.textContent?.includes('Occult hypoxaemia'),
      null,
      { timeout: 30_000 },
    );
    expect(await page.getByTestId('gas-bias').textContent()).toMatch(/9 points above/);

    await page.goto(`${APP_URL}/board`);
    await waitForIsland(page, 'board-tiles');
    const flag = page.getByTestId('tile-4-11').getByTestId('tile-occult');
    expect(await flag.textContent()).toContain('gas SaO₂ 85 % while SpO₂ read 94 %');
    expect(await page.getByTestId('tile-4-11').getByTestId('tile-sentence').textContent()).toContain(
      'Occult hypoxaemia',
    );

    // A correction keeps the original, struck through; the corrected gas no longer shows the flag.
    await page.goto(`${APP_URL}/patients/${patientId}`);
    await waitForIsland(page, 'bed-chart');
    await waitForIsland(page, 'gas-table');
    await page
      .getByTestId('gas-table')
      .locator('tbody tr[data-occult]')
      .first()
      .getByRole('button', { name: /^Correct/ })
      .click();
    const fix = page.getByTestId('gas-correct-form');
    expect(await fix.getByLabel('SaO₂ (%) co-oximetry').inputValue()).toBe('85');
    await fix.getByLabel('SaO₂ (%) co-oximetry').fill('93');
    await fix.getByLabel('Reason for the correction').fill('Read the wrong line of the printout');
    await fix.getByRole('button', { name: 'Save correction' }).click();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="gas-table"] tbody tr[data-status="superseded"]') !== null,
      null,
      { timeout: 20_000 },
    );
    expect(
      await page.getByTestId('gas-table').locator('tbody tr[data-status="superseded"]').first().textContent(),
    ).toContain('Read the wrong line of the printout');
    expect(
      await page.getByTestId('gas-table').locator('tbody tr[data-status="current"]').first().textContent(),
    ).toContain('SaO₂ 93 %');
    await context.close();
  });
});
