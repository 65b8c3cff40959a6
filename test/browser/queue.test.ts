/** Issue 10 point 6: the outreach queue in a browser — time and age, SpO₂ now and its trend, close confirmed, the Closed tab. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { signedIn } from '../support/app.ts';
import { openSignedIn, useBrowser, waitForIsland } from '../support/browser.ts';
import { createAdmittedPatient, createUnit, createUser, testDb } from '../support/db.ts';

const browser = useBrowser();
let db: Knex;
let escalationId: number;
let outreach: { email: string; password: string };

beforeAll(async () => {
  db = testDb();
  const unit = await createUnit(db, 1);
  const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
  outreach = await createUser(db, { role: 'outreach' });
  const intensivist = await createUser(db, { role: 'intensivist' });
  const { patientId: id } = await createAdmittedPatient(db, {
    bedId: unit.bedIds[0],
    since: Date.now() - 6 * 3_600_000,
    band: { low: 92, high: 96, orderedBy: intensivist.id, orderedAt: Date.now() - 5 * 3_600_000 },
  });
  const session = await signedIn(nurse.email, nurse.password);
  for (const [spo2, minsAgo] of [
    [90, 20],
    [89, 1],
  ] as const) {
    await session.post(`/api/patients/${id}/observations`, {
      takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(),
      spo2,
      heartRate: 100,
      respRate: 22,
      device: 'simple_mask',
      flowLpm: 6,
      fio2: 0.4,
      trace: 'clean',
    });
  }
  escalationId = (await db('escalations').where({ patient_id: id, kind: 'below_band' }).first()).id;
});
afterAll(async () => {
  await db?.destroy();
});

describe('outreach queue in a browser', () => {
  it('shows time and age, SpO₂ now with a trend line, confirms a close in words and keeps it under Closed', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: outreach,
      path: '/escalations',
      context: { locale: 'en-US', timezoneId: 'America/New_York' },
    });
    const row = page.getByTestId(`escalation-${escalationId}`);
    await waitForIsland(page, `escalation-${escalationId}`);
    expect(await row.getByTestId('escalation-raised').textContent()).toMatch(
      /^raised \d\d:\d\d · (just now|\d+ s ago|\d+ min ago)$/,
    );
    expect(await row.getByTestId('escalation-now').textContent()).toMatch(/^SpO₂ now 89 % · charted \d\d:\d\d \(/);
    expect(await row.getByTestId('queue-trend').getAttribute('aria-label')).toBe(
      'SpO₂ last 30 min: from 90 to 89 %, lowest 89 %',
    );

    await row.getByRole('button', { name: 'Close…' }).click();
    await row.getByLabel('Outcome').selectOption('treated_at_bedside');
    await row.getByRole('button', { name: 'Close escalation' }).click();
    await page
      .getByTestId('queue-notice')
      .filter({ hasText: 'closed: Treated at the bedside. It is under “Closed (last 7 days)”.' })
      .waitFor({ timeout: 15_000 });
    await row.waitFor({ state: 'detached', timeout: 15_000 });

    await page.getByTestId('queue-tab-closed').click();
    const closed = page.getByTestId(`closed-${escalationId}`);
    await closed.waitFor({ timeout: 15_000 });
    expect(await closed.getByTestId('closed-outcome').textContent()).toMatch(
      /^Treated at the bedside · closed \d{1,2} [A-Z][a-z]{2} \d\d:\d\d by .+ · raised → claimed — · claimed → closed —/,
    );
    await context.close();
  });
});
