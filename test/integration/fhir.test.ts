/**
 * GET /api/patients/:id/fhir against the built app and a real MariaDB: every exported resource
 * validated against the R4 structure definitions (@medplum/core validateResource) and its codes
 * against the R4 code systems (../shared/REFERENCES.md for LOINC and UCUM, from memory).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { codeIssues, ensureIndexed, r4Codes, structureIssues } from '~/lib/fhir/validate.ts';
import type { HttpSession } from '../support/app.ts';
import { createAdmittedPatient } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({
  beds: 3,
  otherBeds: 2,
  people: {
    charge: ['charge', 'unit'],
    nurse: ['nurse', 'unit'],
    otherNurse: ['nurse', 'other'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});
let patientId: number;
const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();
const obs = (extra: Record<string, unknown> = {}) => ({
  takenAt: minutesAgo(30),
  spo2: 91,
  heartRate: 104,
  respRate: 24,
  device: 'simple_mask',
  flowLpm: 6,
  fio2: 0.4,
  trace: 'clean',
  systolic: 112,
  temperature: 37.9,
  consciousness: 'alert',
  ...extra,
});

beforeAll(async () => {
  ensureIndexed();
  r4Codes('http://hl7.org/fhir/bundle-type');
  ({ patientId } = await createAdmittedPatient(db, {
    bedId: unit.bedIds[0],
    since: Date.now() - 5 * 3_600_000,
    givenName: 'Fenna',
    dateOfBirth: '1958-07-21',
    band: {
      low: 88,
      high: 92,
      reason: 'Known CO₂ retainer',
      orderedBy: ids.intensivist,
      orderedAt: Date.now() - 4 * 3_600_000,
    },
  }));
}, 180_000);

async function exportBundle(session: HttpSession, query = '') {
  const res = await session.get(`/api/patients/${patientId}/fhir${query}`);
  expect(res.status, res.status === 200 ? '' : await res.clone().text()).toBe(200);
  expect(res.headers.get('content-type')).toMatch(/application\/fhir\+json/);
  expect(res.headers.get('content-disposition')).toMatch(/attachment; filename="patient-\d+-.*\.fhir\.json"/);
  return { res, bundle: JSON.parse(await res.text()) };
}

describe('GET /api/patients/:id/fhir', () => {
  it('checks the role and the unit on the server', async () => {
    expect((await s.anon.get(`/api/patients/${patientId}/fhir`)).status).toBe(401);
    expect((await s.admin.get(`/api/patients/${patientId}/fhir`)).status).toBe(403);
    expect((await s.otherNurse.get(`/api/patients/${patientId}/fhir`)).status).toBe(403);
    expect((await s.charge.get('/api/patients/99999999/fhir')).status).toBe(404);
    for (const who of ['nurse', 'intensivist', 'outreach'])
      expect((await s[who]!.get(`/api/patients/${patientId}/fhir`)).status).toBe(200);
  });

  it('refuses a bad window with the field and the reason', async () => {
    for (const [q, field] of [
      ['?from=yesterday', 'from'],
      ['?from=2026-11-31T00:00:00Z', 'from'],
      ['?from=2026-12-02T10:00:00Z&to=2026-12-01T10:00:00Z', 'from'],
      ['?from=2026-10-01T00:00:00Z&to=2026-12-01T00:00:00Z', 'from'],
      ['?to=2026-12-01T10:00', 'to'],
    ] as const) {
      const res = await s.charge.get(`/api/patients/${patientId}/fhir${q}`);
      expect(res.status, q).toBe(400);
      expect((await res.json()).error.fields, q).toHaveProperty(field);
    }
  });

  it('exports the Patient, the stay, the band and every obs with its status; every resource valid R4 with R4 codes', async () => {
    const made = await s.charge.post(`/api/patients/${patientId}/observations`, obs());
    expect(made.status).toBe(201);
    const original = (await made.json()).observation;
    const fixed = await s.charge.post(`/api/observations/${original.id}/correct`, {
      reason: 'Read the wrong monitor',
      obs: obs({ spo2: 90, takenAt: original.takenAt }),
    });
    expect(fixed.status).toBe(201);
    const correction = (await fixed.json()).observation;
    const wrong = (
      await (
        await s.charge.post(`/api/patients/${patientId}/observations`, obs({ takenAt: minutesAgo(20), spo2: 99 }))
      ).json()
    ).observation;
    expect(
      (await s.charge.post(`/api/observations/${wrong.id}/entered-in-error`, { reason: 'Wrong patient' })).status,
    ).toBe(200);
    await db('observations').insert({
      patient_id: patientId,
      bed_id: unit.bedIds[0],
      taken_at: new Date(Date.now() - 10 * 60_000),
      source: 'device',
      spo2: 89,
      heart_rate: 101,
      perfusion_index: 0.9,
      trace: 'weak',
    });

    const { bundle } = await exportBundle(s.intensivist, `?from=${encodeURIComponent(minutesAgo(6 * 60))}`);
    expect(bundle).toMatchObject({ resourceType: 'Bundle', type: 'collection' });
    expect(structureIssues(bundle)).toEqual([]);
    expect(codeIssues(bundle)).toEqual([]);
    for (const e of bundle.entry) {
      expect(structureIssues(e.resource), e.resource.id).toEqual([]);
      expect(codeIssues(e.resource), e.resource.id).toEqual([]);
    }
    const byType = (t: string) =>
      bundle.entry
        .map((e: { resource: Record<string, any> }) => e.resource)
        .filter((r: { resourceType: string }) => r.resourceType === t);
    expect(byType('Patient')).toHaveLength(1);
    expect(byType('Encounter')).toMatchObject([{ status: 'in-progress' }]);
    expect(byType('Goal')).toMatchObject([
      {
        lifecycleStatus: 'active',
        expressedBy: { display: expect.any(String) },
        note: [{ text: 'Known CO₂ retainer' }],
        target: [{ detailRange: { low: { value: 88 }, high: { value: 92 } } }],
      },
    ]);

    const spo2 = byType('Observation').filter((r: any) => r.code.coding[0].code === '59408-5');
    const status = (obsId: number) => spo2.find((r: any) => r.id === `obs-${obsId}-spo2`)?.status;
    expect(status(original.id)).toBe('entered-in-error');
    expect(status(correction.id)).toBe('corrected');
    expect(status(wrong.id)).toBe('entered-in-error');
    expect(spo2.find((r: any) => r.id === `obs-${correction.id}-spo2`).valueQuantity.value).toBe(90);
    const device = spo2.find((r: any) => r.note?.[0]?.text.startsWith('From a bedside monitor'));
    expect(device).toMatchObject({ status: 'final', valueQuantity: { value: 89, code: '%' } });
    // Observations in time order; nothing outside the window.
    const times = byType('Observation').map((r: any) => r.effectiveDateTime);
    expect([...times].sort()).toEqual(times);
    const { bundle: narrow } = await exportBundle(
      s.charge,
      `?from=${encodeURIComponent(minutesAgo(15))}&to=${encodeURIComponent(minutesAgo(5))}`,
    );
    expect(
      narrow.entry
        .filter((e: any) => e.resource.resourceType === 'Observation')
        .map((e: any) => e.resource.valueQuantity.value),
    ).toEqual([89, 101]);
  });

  it('streams a large window (chunked, no length) and every reading arrives', async () => {
    const { patientId: pid } = await createAdmittedPatient(db, {
      bedId: unit.bedIds[1],
      since: Date.now() - 30 * 3_600_000,
    });
    const start = Math.floor(Date.now() / 1000) * 1000 - 6 * 3_600_000;
    const rows = Array.from({ length: 12_000 }, (_, i) => ({
      patient_id: pid,
      bed_id: unit.bedIds[1],
      taken_at: new Date(start + i * 1000),
      source: 'device',
      spo2: 90 + (i % 8),
      heart_rate: 80,
      trace: 'clean',
    }));
    for (let i = 0; i < rows.length; i += 2000) await db('observations').insert(rows.slice(i, i + 2000));
    const res = await s.charge.get(
      `/api/patients/${pid}/fhir?from=${encodeURIComponent(new Date(start - 1000).toISOString())}`,
    );
    expect(res.status).toBe(200);
    expect(res.headers.get('content-length')).toBeNull();
    let chunks = 0;
    let text = '';
    const reader = res.body!.getReader();
    const decoder = new TextDecoder();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      chunks++;
      text += decoder.decode(value, { stream: true });
    }
    expect(chunks).toBeGreaterThan(1);
    const bundle = JSON.parse(text);
    const observations = bundle.entry.filter((e: any) => e.resource.resourceType === 'Observation');
    expect(observations).toHaveLength(24_000); // SpO₂ and heart rate per reading
    expect(new Set(observations.map((e: any) => e.resource.id)).size).toBe(24_000);
  });
});
