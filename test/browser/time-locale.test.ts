/**
 * Issue 10 point 8: one way to show time. The same pages seen from a browser set to US English in
 * New York and from one set to British English in London read the same text: unit time zone,
 * 24-hour clock, day first with the month as a word — never the browser's locale or zone.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { APP_URL } from '../support/app.ts';
import { signInThroughForm, useBrowser, waitForIsland } from '../support/browser.ts';
import { demoPatientId } from '../support/pages.ts';

const browser = useBrowser();
let patientId: number;
beforeAll(async () => {
  patientId = await demoPatientId('4-03');
});

const US = { locale: 'en-US', timezoneId: 'America/New_York' };
const GB = { locale: 'en-GB', timezoneId: 'Europe/London' };

/** What a charge nurse reads on the bed chart and the patient list, in one browser set-up. */
async function read(context: BrowserContext) {
  const page = await context.newPage();
  await signInThroughForm(page, 'charge@harbourside.example');
  await page.goto(`${APP_URL}/patients/${patientId}`);
  await waitForIsland(page, 'obs-entry-form');
  await page.waitForFunction(
    () => (document.querySelector('[data-testid="obs-record"] tbody tr')?.textContent ?? '').length > 0,
    null,
    { timeout: 20_000 },
  );
  const form = page.getByTestId('obs-entry-form');
  const out = {
    record: (await page.getByTestId('obs-record').locator('tbody').textContent()) ?? '',
    date: await form.getByLabel('Date taken', { exact: true }).inputValue(),
    time: await form.getByLabel('Time taken', { exact: true }).inputValue(),
    dateInputs: await page.locator('input[type="datetime-local"], input[type="date"], input[type="time"]').count(),
    chartText: (await page.locator('main').textContent()) ?? '',
    patients: '',
  };
  await page.goto(`${APP_URL}/patients`);
  await page.locator('astro-island:not([ssr])').first().waitFor({ timeout: 20_000 });
  await page.waitForFunction(() => (document.querySelector('main table tbody')?.textContent ?? '').length > 0, null, {
    timeout: 20_000,
  });
  out.patients = (await page.locator('main table tbody').textContent()) ?? '';
  await page.close();
  return out;
}

describe('times read the same whatever the browser locale and zone', () => {
  it('a US-English browser in New York sees the unit-zone, 24-hour, day-first text a British one sees', async () => {
    const gbContext = await browser.newContext(GB);
    const usContext = await browser.newContext(US);
    try {
      const [gb, us] = [await read(gbContext), await read(usContext)];
      expect(us.record).toBe(gb.record);
      expect(us.patients).toBe(gb.patients);
      expect(us.date).toBe(gb.date);
      // The entry time is "now" in the unit zone; the two reads may straddle a minute.
      expect(
        Math.abs(Date.parse(`${us.date}T${us.time}:00Z`) - Date.parse(`${gb.date}T${gb.time}:00Z`)),
      ).toBeLessThanOrEqual(60_000);
      expect(us.dateInputs).toBe(0);
      // Day first with the month as a word, 24-hour; no US date or 12-hour clock anywhere.
      expect(us.record).toMatch(/\b\d{1,2} (Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec)\b|\b\d\d:\d\d\b/);
      for (const text of [us.record, us.patients, us.chartText]) {
        expect(text).not.toMatch(/\b\d{1,2}\/\d{1,2}\/\d{2,4}\b/);
        expect(text).not.toMatch(/\d(\s| )?(AM|PM)\b/);
      }
    } finally {
      await gbContext.close();
      await usContext.close();
    }
  });
});
