import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { Hl7Client } from '@medplum/hl7';
import { buildOru } from '~/lib/hl7/oru.ts';
import { followNav, openSignedIn, useBrowser } from '../support/browser.ts';
import { createAdmittedPatient, createUnit, createUser, testDb, unique } from '../support/db.ts';

const browser = useBrowser();
let db: Knex;
let unit: { unitId: number; code: string; bedIds: number[] };
let patientId: number;
let charge: { email: string; password: string };

beforeAll(async () => {
  db = testDb();
  unit = await createUnit(db, 2);
  charge = await createUser(db, { role: 'charge', unitId: unit.unitId });
  ({ patientId } = await createAdmittedPatient(db, { bedId: unit.bedIds[0], since: Date.now() - 3_600_000 }));
});
afterAll(async () => {
  await db?.destroy();
});

describe('HL7 gateways page and the FHIR download', () => {
  it('an admin registers a gateway and maps a bed name; its message is then stored; the bed chart offers the FHIR export', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'admin@harbourside.example',
      context: { viewport: { width: 1440, height: 900 } },
    });
    await followNav(page, 'HL7 gateways', '/admin/gateways');
    await page.locator('astro-island:not([ssr])').first().waitFor();
    const app = unique('PW').slice(0, 16);
    const label = unique('bay gateway ');
    await page.getByLabel('Gateway', { exact: true }).fill(label);
    await page.getByLabel('Sending application (MSH-3)').fill(app);
    await page.getByLabel('Sending facility (MSH-4)').fill('HARBOUR');
    await page.getByRole('button', { name: 'Register gateway' }).click();
    const card = page.locator('li', { hasText: label });
    await card.waitFor();
    await card.getByLabel('Bed name as sent in PV1-3').fill('PW^^1');
    // By value: bed labels repeat across the fixture units.
    await card.getByLabel('is our bed').selectOption(String(unit.bedIds[0]));
    await card.getByRole('button', { name: 'Map bed' }).click();
    await card.locator('td', { hasText: 'PW^^1' }).waitFor();
    await context.close();

    const client = new Hl7Client({ host: '127.0.0.1', port: Number(process.env.EBB_MLLP_PORT) });
    const at = new Date(Math.floor(Date.now() / 1000) * 1000 - 60_000);
    const ack = await client.sendAndWait(
      buildOru({
        application: app,
        facility: 'HARBOUR',
        controlId: unique('C'),
        bedName: 'PW^^1',
        sentAt: new Date(),
        readings: [{ at, spo2: 94, heartRate: 77 }],
      }),
      { returnAck: 'first', timeoutMs: 10_000 },
    );
    await client.close();
    expect(ack.getSegment('MSA')!.getField(1).toString()).toBe('AA');
    expect(ack.getSegment('MSA')!.getField(3).toString()).toMatch(/^1 stored/);

    const { context: chartContext, page: chart } = await openSignedIn(browser, {
      as: charge,
      path: `/patients/${patientId}`,
      context: { viewport: { width: 390, height: 844 }, acceptDownloads: true },
    });
    const section = chart.getByTestId('fhir-export');
    await section.getByRole('link', { name: 'Last 12 h' }).waitFor();
    const [download] = await Promise.all([
      chart.waitForEvent('download'),
      section.getByRole('link', { name: 'Last 12 h' }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(new RegExp(`^patient-${patientId}-.*\\.fhir\\.json$`));
    const text = await (await download.createReadStream()).toArray();
    const bundle = JSON.parse(Buffer.concat(text as Buffer[]).toString('utf8'));
    expect(bundle.type).toBe('collection');
    const spo2 = bundle.entry
      .map((e: { resource: any }) => e.resource)
      .filter((r: any) => r.resourceType === 'Observation' && r.code.coding[0].code === '59408-5');
    expect(spo2.map((r: any) => [r.effectiveDateTime, r.valueQuantity.value])).toEqual([[at.toISOString(), 94]]);
    await chartContext.close();
  });
});
