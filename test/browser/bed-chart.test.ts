/**
 * The bed chart in a real browser (issue 11): the nurse reaches SpO₂ from page load in at most
 * 3 Tab presses and Enter saves; opened to chart obs, SpO₂ has focus; printing to PDF (A4) gives the
 * header, the chart and figures and every charted obs of the window, without navigation or forms.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { signedIn } from '../support/app.ts';
import { openSignedIn, useBrowser } from '../support/browser.ts';
import { testDb } from '../support/db.ts';
import { formatDayTime } from '../../src/lib/time/format.ts';

const browser = useBrowser();
let patientId: number;
let timeZone: string;
beforeAll(async () => {
  const db = testDb();
  // The demo patient in bed 4-03 (a bed of the demo nurse).
  const stay = await db('bed_stays as s')
    .join('beds as b', 'b.id', 's.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .where('b.label', '4-03')
    .whereNull('s.ended_at')
    .first('s.patient_id', 'u.time_zone');
  await db.destroy();
  patientId = Number(stay.patient_id);
  timeZone = stay.time_zone;
}, 60_000);

describe('bed chart: keyboard', () => {
  it('reaches SpO₂ in at most 3 Tab presses from page load (skip link), and Enter saves', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'nurse@harbourside.example',
      path: `/patients/${patientId}`,
      island: 'obs-entry-form',
      context: { viewport: { width: 1440, height: 900 } },
    });
    let presses = 0;
    for (; presses < 3; presses++) {
      if (await page.evaluate(() => document.activeElement?.getAttribute('name') === 'spo2')) break;
      await page.keyboard.press('Tab');
      // A skip link to the entry form: follow it.
      if (await page.evaluate(() => (document.activeElement as HTMLAnchorElement | null)?.hash === '#chart-obs'))
        await page.keyboard.press('Enter');
    }
    expect(await page.evaluate(() => document.activeElement?.getAttribute('name'))).toBe('spo2');
    expect(presses).toBeLessThanOrEqual(3);
    // The SpO₂ field is on the first screen at a desk.
    const box = await page.locator('#chart-obs input[name="spo2"]').boundingBox();
    expect(box!.y + box!.height).toBeLessThanOrEqual(900);

    await page.keyboard.type('95');
    await page.keyboard.press('Tab');
    await page.keyboard.type('82');
    const [res] = await Promise.all([
      page.waitForResponse(
        (r) => r.url().endsWith(`/api/patients/${patientId}/observations`) && r.request().method() === 'POST',
      ),
      page.keyboard.press('Enter'),
    ]);
    expect(res.status()).toBe(201);
    await context.close();
  }, 60_000);

  it('focuses SpO₂ when the chart is opened to chart obs', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'nurse@harbourside.example',
      path: `/patients/${patientId}#chart-obs`,
      island: 'obs-entry-form',
      context: { viewport: { width: 1440, height: 900 } },
    });
    await page.waitForFunction(() => document.activeElement?.getAttribute('name') === 'spo2', null, {
      timeout: 10_000,
    });
    await context.close();
  }, 60_000);

  it('puts the patient, the chart, the figures and the band in force on the first screen at 1440×900', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'nurse@harbourside.example',
      path: `/patients/${patientId}`,
      island: 'chart-summary',
      context: { viewport: { width: 1440, height: 900 } },
    });
    for (const id of ['chart-heading', 'chart-area', 'derived-figures', 'target-panel', 'obs-entry-form']) {
      const box = await page.getByTestId(id).first().boundingBox();
      expect(box, id).not.toBeNull();
      expect(box!.y, `${id} starts on the first screen`).toBeLessThan(900);
    }
    await context.close();
  }, 60_000);
});

describe('bed chart: print', () => {
  it('prints A4 with the header, chart, figures and every charted obs of the window, and no navigation, forms or buttons', async () => {
    // More charted obs in the window than one page of the record holds (20).
    const nurse = await signedIn('nurse@harbourside.example');
    const times: number[] = [];
    for (let i = 0; i < 24; i++) {
      const t = Date.now() - (230 - i * 9) * 60_000;
      times.push(t);
      const res = await nurse.post(`/api/patients/${patientId}/observations`, {
        takenAt: new Date(t).toISOString(),
        spo2: 90 + (i % 6),
        heartRate: 80 + i,
        device: 'nasal_cannula',
        flowLpm: 2,
        trace: 'clean',
      });
      expect(res.status, await res.clone().text()).toBe(201);
    }
    const { context, page } = await openSignedIn(browser, {
      as: 'nurse@harbourside.example',
      path: `/patients/${patientId}`,
      island: 'chart-summary',
      context: { viewport: { width: 1440, height: 900 } },
    });
    await page.waitForFunction(
      () => document.querySelectorAll('[data-testid="print-record"] tbody tr').length >= 24,
      null,
      { timeout: 20_000 },
    );
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    await context.close();

    const dir = mkdtempSync(join(tmpdir(), 'ebb-print-'));
    const file = join(dir, 'chart.pdf');
    writeFileSync(file, pdf);
    const info = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
    const pages = Number(/Pages:\s+(\d+)/.exec(info)![1]);
    expect(info).toMatch(/Page size:\s+59\d(\.\d+)? x 84\d(\.\d+)? pts \(A4\)/);
    expect(pages).toBeGreaterThanOrEqual(1);
    expect(pages).toBeLessThanOrEqual(4);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });

    const db = testDb();
    const p = await db('patients').where({ id: patientId }).first('family_name', 'mrn');
    const band = await db('target_orders')
      .where({ patient_id: patientId })
      .orderBy('ordered_at', 'desc')
      .first('low', 'high');
    await db.destroy();
    expect(text).toContain(p.family_name);
    expect(text).toContain(`MRN ${p.mrn}`);
    expect(text).toMatch(/Level 4 ICU, bed 4-03/);
    if (band) expect(text).toContain(`band ${band.low}–${band.high} %`);
    expect(text).toMatch(/Printed \d{1,2} \w{3} \d\d:\d\d .* by /);
    expect(text).toContain('SpO₂ %'); // the chart panels
    expect(text).toMatch(/time in band/i); // the figures (labels are upper-cased by CSS)
    // Every charted obs of the window, not one page of 20.
    for (const t of times) expect(text, formatDayTime(t, timeZone)).toContain(formatDayTime(t, timeZone));
    // No navigation, forms or buttons.
    for (const gone of ['Night mode', 'Sign out', 'Save obs', 'Skip to main content', 'Chart window', 'Correct'])
      expect(text).not.toContain(gone);
  }, 90_000);
});
