import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { Knex } from 'knex';
import { followNav, openSignedIn, useBrowser, waitForIsland } from '../support/browser.ts';
import { createAdmittedPatient, createUnit, createUser, testDb } from '../support/db.ts';

const browser = useBrowser();
let db: Knex;
beforeAll(() => {
  db = testDb();
});
afterAll(async () => {
  await db?.destroy();
});

async function verdictOf(page: Page, button: string, file: string, expected: string) {
  await page.getByRole('button', { name: button }).click();
  // The strip's file name is in the box, so a second doubtful strip is not mistaken for the first.
  const box = page.locator(`[data-testid="pleth-verdict"][data-verdict="${expected}"]`).filter({ hasText: file });
  await box.waitFor({ timeout: 15_000 });
  return (await box.textContent()) ?? '';
}

describe('pleth strip check page', () => {
  it('shows the verdict for each example strip, with waveforms and figures', async () => {
    const { context, page } = await openSignedIn(browser, { as: 'intensivist@harbourside.example' });
    await followNav(page, 'Strip check', '/pleth');
    await waitForIsland(page, 'strip-file'); // the header's search is an island too: wait for this page's own

    expect(await verdictOf(page, 'Clean trace', 'clean.csv', 'trustworthy')).toContain('Trustworthy');
    expect(await page.getByTestId('pleth-figures').textContent()).toMatch(/SpO₂ from the curve9[67]\.\d %/);
    // Beats are drawn on the infrared waveform (recharts reference lines) and the waveform itself.
    expect(await page.getByTestId('wave-infrared').locator('.recharts-reference-line').count()).toBeGreaterThan(10);
    expect(await page.getByTestId('wave-red').locator('.recharts-line path').count()).toBeGreaterThan(0);

    const motion = await verdictOf(page, 'Hand moving', 'motion.csv', 'doubtful');
    expect(motion).toContain('Doubtful');
    expect(motion).toMatch(/motion in \d+ % of the strip/);

    const cold = await verdictOf(page, 'Cold hands, weak pulse', 'low-perfusion.csv', 'doubtful');
    expect(cold).toMatch(/perfusion index 0\.\d+ % under 0\.4 %/);
    await context.close();
  });

  it("names the line of a bad strip, and attaches a checked strip to a patient's reading", async () => {
    const unit = await createUnit(db, 1);
    const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
    const { patientId: pid } = await createAdmittedPatient(db, {
      bedId: unit.bedIds[0],
      since: Date.now() - 3_600_000,
    });
    const [obsId] = await db('observations').insert({
      patient_id: pid,
      bed_id: unit.bedIds[0],
      taken_at: new Date(Date.now() - 5 * 60_000),
      source: 'device',
      spo2: 86,
      trace: 'weak',
    });

    const { context, page } = await openSignedIn(browser, { as: nurse, path: `/pleth?patient=${pid}` });
    await waitForIsland(page, 'strip-file'); // the header's search is an island too: wait for this page's own

    await page.getByTestId('strip-file').setInputFiles({
      name: 'broken.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('time,red,infrared,dark\n0,1,1,0\n0.01,x,1,0\n'),
    });
    expect(await page.getByTestId('strip-problem').textContent()).toContain('line 3: red "x" is not a number');

    await verdictOf(page, 'Cold hands, weak pulse', 'low-perfusion.csv', 'doubtful');
    const attach = page.getByTestId('pleth-attach');
    await attach.getByLabel('Reading checked').selectOption(String(obsId));
    await attach.getByLabel('Note (optional)').fill('warmed the hand, resited probe');
    await attach.getByRole('button', { name: 'Attach to record' }).click();
    await page
      .getByTestId('attached-checks')
      .filter({ hasText: 'probe trace checked: doubtful' })
      .waitFor({ timeout: 10_000 });
    const row = await db('pleth_checks').where({ patient_id: pid }).first();
    expect(row).toMatchObject({
      observation_id: obsId,
      verdict: 'doubtful',
      note: 'warmed the hand, resited probe',
      checked_by: nurse.id,
      file_name: 'low-perfusion.csv',
    });
    expect(
      await db('audit_log')
        .where({ entity: 'pleth_check', entity_id: String(row.id) })
        .pluck('action'),
    ).toEqual(['pleth.attach']);
    await context.close();
  });
});
