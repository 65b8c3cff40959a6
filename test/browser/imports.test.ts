import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { APP_URL } from '../support/app.ts';
import { followNav, openSignedIn, useBrowser, waitForIsland } from '../support/browser.ts';
import { createAdmittedPatient, createUnit, createUser, testDb, unique } from '../support/db.ts';

const browser = useBrowser();
let db: Knex;
let nurse: { email: string; password: string };
let patientId: number;

beforeAll(async () => {
  db = testDb();
  const unit = await createUnit(db, 2);
  nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
  const intensivist = await createUser(db, { role: 'intensivist' });
  ({ patientId } = await createAdmittedPatient(db, {
    bedId: unit.bedIds[0],
    since: Date.now() - 8 * 3_600_000,
    band: {
      low: 92,
      high: 96,
      news2Scale: 1,
      reason: 'Fixture band',
      orderedBy: intensivist.id,
      orderedAt: Date.now() - 8 * 3_600_000,
    },
  }));
});
afterAll(async () => {
  await db?.destroy();
});

/** 240 readings a minute apart ending 10 minutes ago, ISO times; line 6 is refused (SpO₂ 140). */
function trendFile(): Buffer {
  const end = Date.now() - 10 * 60_000;
  const lines = ['Time,SpO2,HR,PI,Quality'];
  for (let i = 0; i < 240; i++) {
    const at = new Date(end - (239 - i) * 60_000).toISOString();
    lines.push(`${at},${i === 4 ? 140 : 93 + (i % 3)},${76 + (i % 5)},1.9,clean`);
  }
  return Buffer.from(`${lines.join('\n')}\n`);
}

describe('monitor trend file upload on the bed chart', () => {
  it('a nurse uploads a trend file, previews, commits, and the chart shows the readings', async () => {
    const { context, page } = await openSignedIn(browser, { as: nurse, path: `/patients/${patientId}` });
    await page.getByTestId('reading-counts').waitFor({ timeout: 20_000 });
    expect(await page.getByTestId('reading-counts').textContent()).toMatch(/shown of 0\b/);

    // The island hydrates when visible: scroll to it and wait for Astro to hydrate it.
    const section = page.getByTestId('trend-upload');
    await section.scrollIntoViewIfNeeded();
    await waitForIsland(page, 'trend-upload');

    // A slow uplink so the progress bar is seen (Chromium network emulation, ~60 kB/s).
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 20,
      downloadThroughput: -1,
      uploadThroughput: 60 * 1024,
    });

    await page
      .getByTestId('trend-file')
      .setInputFiles({ name: 'monitor-trend.csv', mimeType: 'text/csv', buffer: trendFile() });
    // Columns were guessed from the header; times carry Z, so ISO 8601 is chosen.
    expect(await page.getByLabel('SpO₂ column').inputValue()).toBe('SpO2');
    expect(await page.getByLabel('Heart rate column').inputValue()).toBe('HR');
    expect(await page.getByRole('radio', { name: /ISO 8601/ }).isChecked()).toBe(true);

    await page.getByRole('button', { name: 'Preview' }).click();
    await page.getByTestId('upload-progress').waitFor({ timeout: 10_000 });
    const preview = page.getByTestId('trend-preview');
    await preview.waitFor({ timeout: 20_000 });
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 0,
      downloadThroughput: -1,
      uploadThroughput: -1,
    });
    expect(await page.getByTestId('preview-rows').textContent()).toBe('240');
    expect(await page.getByTestId('preview-to-store').textContent()).toBe('239');
    expect(await page.getByTestId('preview-refused').textContent()).toBe('1');
    const refused = await page.getByTestId('refused-rows').textContent();
    expect(refused).toContain('6');
    expect(refused).toContain('SpO₂ 140 is over 100 %');
    // Nothing is stored by a preview.
    expect(await db('observations').where({ patient_id: patientId }).count({ n: '*' }).first()).toEqual({ n: 0 });

    await page.getByRole('button', { name: 'Commit 239 readings' }).click();
    await page.getByTestId('upload-message').filter({ hasText: 'Stored 239 readings' }).waitFor({ timeout: 20_000 });
    await page.getByTestId('import-list').filter({ hasText: 'monitor-trend.csv' }).waitFor();

    // The chart island refetches: its count of readings in the window now holds the import.
    await page
      .getByTestId('reading-counts')
      .filter({ hasText: /shown of 239\b/ })
      .waitFor({ timeout: 20_000 });
    await page.getByTestId('latest-spo2').waitFor();
    await context.close();
  });
});

describe('trend upload: a column that does not fit (issue 10 point 10)', () => {
  it('names the column, offers to leave it unmapped, and groups refused lines by reason', async () => {
    const end = Date.now() - 6 * 3_600_000;
    const lines = ['Time,SpO2,HR,Signal'];
    for (let i = 0; i < 30; i++)
      lines.push(`${new Date(end - (29 - i) * 60_000).toISOString()},${i < 3 ? 140 : 95},80,ok`);
    const { context, page } = await openSignedIn(browser, { as: nurse, path: `/patients/${patientId}` });
    const section = page.getByTestId('trend-upload');
    await section.scrollIntoViewIfNeeded();
    await waitForIsland(page, 'trend-upload');
    await page
      .getByTestId('trend-file')
      .setInputFiles({ name: 'signal-ok.csv', mimeType: 'text/csv', buffer: Buffer.from(`${lines.join('\n')}\n`) });
    expect(await page.getByLabel('Trace quality column').inputValue()).toBe('Signal');
    await page.getByRole('button', { name: 'Preview' }).click();
    const unfit = page.getByTestId('unfit-column');
    await unfit.waitFor({ timeout: 20_000 });
    expect(await unfit.textContent()).toContain(
      'Column “Signal”, mapped as trace quality, does not fit: 27 of 30 rows were refused for its values (such as “ok”)',
    );
    const groups = await page.getByTestId('refused-groups').textContent();
    expect(groups).toContain('quality is not one of clean, weak, noisy, absent275, 6, 7, 8, 9, …');
    expect(groups).toContain('SpO₂ over 100 %32, 3, 4');
    await page.getByRole('button', { name: 'Leave “Signal” unmapped' }).click();
    expect(await page.getByLabel('Trace quality column').inputValue()).toBe('');
    await page.getByRole('button', { name: 'Preview' }).click();
    await page.getByTestId('trend-preview').waitFor({ timeout: 20_000 });
    expect(await page.getByTestId('preview-to-store').textContent()).toBe('27');
    expect(await page.getByTestId('unfit-column').count()).toBe(0);
    await context.close();
  });
});

describe('device keys page', () => {
  it('an admin makes a key for a bed, sees it once, and revokes it', async () => {
    const { context, page } = await openSignedIn(browser, { as: 'admin@harbourside.example' });
    await followNav(page, 'Device keys', '/admin/devices');
    await page.locator('astro-island:not([ssr])').first().waitFor();
    const label = unique('east wall gateway ');
    await page.getByLabel('Bed').selectOption({ label: '4-12' });
    await page.getByLabel('Gateway or monitor').fill(label);
    await page.getByRole('button', { name: 'Create key' }).click();
    const key = (await page.getByTestId('new-device-key').textContent())!;
    expect(key).toMatch(/^ebw_/);
    await page.getByRole('button', { name: 'Done, hide it' }).click();
    expect(await page.getByTestId('new-device-key').count()).toBe(0);
    const row = page.getByTestId('device-key-table').locator('tr', { hasText: label });
    expect(await row.textContent()).toContain(`${key.slice(0, 10)}…`);
    expect(await page.content()).not.toContain(key);
    await row.getByRole('button', { name: 'Revoke' }).click();
    await row.getByLabel('Reason').fill('gateway moved to bay 3');
    await row.getByRole('button', { name: 'Revoke key' }).click();
    await row.filter({ hasText: 'revoked' }).waitFor();
    const res = await fetch(`${APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
      body: JSON.stringify({ readings: [{ at: new Date().toISOString(), spo2: 95 }] }),
    });
    expect(res.status).toBe(401);
    await context.close();
  });
});
