import { beforeAll, describe, expect, it } from 'vitest';
import { APP_URL } from '../support/app.ts';
import { waitForMail } from '../support/mailbox.ts';
import { fillByLabel, openSignedIn, signInThroughForm, useBrowser, waitForIsland } from '../support/browser.ts';
import { createUnit, testDb, unique } from '../support/db.ts';
import { signInPeople } from '../support/people.ts';

const browser = useBrowser();
let unitCode: string;
let patientId: number;

beforeAll(async () => {
  const db = testDb();
  const unit = await createUnit(db, 2);
  unitCode = unit.code;
  const { sessions } = await signInPeople(db, { charge: ['charge', unit.unitId] });
  const res = await sessions.charge.post('/api/patients', {
    givenName: 'Perpetua',
    familyName: unique('Lowe'),
    mrn: unique('BR').toUpperCase().slice(0, 20),
    dateOfBirth: '1957-03-14',
    bedId: unit.bedIds[0],
  });
  patientId = (await res.json()).patient.id;
  const obs = await sessions.charge.post(`/api/patients/${patientId}/observations`, {
    takenAt: new Date(Date.now() - 5 * 60_000).toISOString(),
    spo2: 96,
    heartRate: 78,
    respRate: 15,
    device: 'room_air',
    trace: 'clean',
  });
  expect(obs.status).toBe(201);
  await db.destroy();
});

describe('running staff without a developer', () => {
  it('admin adds a nurse; she sets a password from the e-mailed link, signs in and charts; deactivation stops her open page', async () => {
    const email = `${unique('nia')}@fixture.example`;
    const password = 'saltmarsh heron at dusk';

    // The admin adds the nurse.
    const adminCtx = await browser.newContext();
    const admin = await adminCtx.newPage();
    admin.on('dialog', (d) => void d.accept());
    await signInThroughForm(admin, 'admin@harbourside.example');
    await admin.goto(`${APP_URL}/admin/users`);
    await waitForIsland(admin, 'create-user');
    const form = admin.getByTestId('create-user');
    await form.getByLabel('Name').fill('Nia Okafor');
    await form.getByLabel('E-mail').fill(email);
    await form.getByLabel('Role').selectOption('nurse');
    await admin.waitForFunction(
      (code) => [...document.querySelectorAll('#new-unit option')].some((o) => (o as HTMLOptionElement).value === code),
      unitCode,
      { timeout: 15_000 },
    );
    await form.locator('#new-unit').selectOption(unitCode);
    await form.getByRole('button', { name: 'Add person' }).click();
    await admin.getByTestId('staff-message').filter({ hasText: 'set-password link' }).waitFor({ timeout: 15_000 });

    // The link arrives in the SMTP fake.
    const [mail] = await waitForMail((m) => m.to.includes(email), 30_000);
    expect(mail, 'set-password mail').toBeTruthy();
    const link = mail.text.match(/https?:\/\/\S+\/set-password\?token=[A-Za-z0-9_-]+/)![0];
    expect(link.startsWith(APP_URL)).toBe(true);

    // The nurse follows it and chooses a password; the strength is shown while she types.
    const nurseCtx = await browser.newContext();
    const nurse = await nurseCtx.newPage();
    await nurse.goto(link);
    expect(await nurse.getByTestId('link-email').textContent()).toBe(email);
    await waitForIsland(nurse, 'password-form');
    await nurse.waitForSelector('[data-testid="password-form"][data-ready="yes"]', { timeout: 20_000 });
    await nurse.getByLabel('New password', { exact: true }).fill('password1234');
    await nurse.getByTestId('password-strength').filter({ hasText: 'commonly used' }).waitFor({ timeout: 10_000 });
    await nurse.getByLabel('New password', { exact: true }).fill(password);
    await nurse.getByTestId('password-strength').filter({ hasText: 'Strength: strong' }).waitFor({ timeout: 10_000 });
    await nurse.getByLabel('New password again').fill(password);
    await nurse.getByRole('button', { name: 'Set password' }).click();
    await nurse.getByTestId('password-done').waitFor({ timeout: 15_000 });

    // She signs in and charts obs.
    await signInThroughForm(nurse, email, password);
    expect(new URL(nurse.url()).pathname).toBe('/');
    await nurse.goto(`${APP_URL}/patients/${patientId}`);
    await waitForIsland(nurse, 'obs-entry-form');
    const obs = nurse.getByTestId('obs-entry-form');
    await fillByLabel(obs, { 'SpO₂ (%)': '93', 'Heart rate (/min)': '91', 'Respiratory rate (/min)': '19' });
    await obs.getByLabel('Heart rate (/min)').press('Enter');
    await nurse.getByText('Saved', { exact: false }).first().waitFor({ timeout: 15_000 });
    await nurse.waitForFunction(
      () => document.querySelector('[data-testid="obs-record"] tbody tr')?.textContent?.includes('91'),
      null,
      { timeout: 20_000 },
    );

    // The admin deactivates her.
    await admin.reload();
    await waitForIsland(admin, 'user-table');
    const row = admin.getByTestId(`user-${email}`);
    await row.getByRole('button', { name: 'Deactivate' }).click();
    await admin.getByTestId('staff-message').filter({ hasText: 'deactivated' }).waitFor({ timeout: 15_000 });
    await row.getByText('deactivated').waitFor({ timeout: 10_000 });

    // Her open page stops working at its next request: saving is refused, and a reload lands on sign-in.
    await fillByLabel(obs, { 'SpO₂ (%)': '92', 'Heart rate (/min)': '90', 'Respiratory rate (/min)': '18' });
    await obs.getByLabel('Heart rate (/min)').press('Enter');
    await obs
      .getByRole('alert')
      .filter({ hasText: /sign in/i })
      .waitFor({ timeout: 15_000 });
    await nurse.reload();
    expect(new URL(nurse.url()).pathname).toBe('/signin');
    await adminCtx.close();
    await nurseCtx.close();
  });

  it('a clinician finds a patient from the header: / focuses, arrows and Enter open the chart', async () => {
    const { context: ctx, page } = await openSignedIn(browser, {
      as: 'intensivist@harbourside.example',
      island: 'patient-search',
    });
    await page.locator('body').press('/');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('patient-search-input');
    await page.keyboard.type('Perpetua');
    await page.getByRole('option').first().waitFor({ timeout: 15_000 });
    await page.keyboard.press('ArrowDown');
    await page.keyboard.press('ArrowUp');
    await Promise.all([page.waitForURL(`${APP_URL}/patients/${patientId}`), page.keyboard.press('Enter')]);
    await ctx.close();
  });
});
