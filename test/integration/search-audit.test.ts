import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import type { HttpSession } from '../support/app.ts';
import { createUnit, testDb, unique } from '../support/db.ts';
import { signInPeople } from '../support/people.ts';

let db: Knex;
let unit: { unitId: number; code: string; bedIds: number[] };
let other: { unitId: number; code: string; bedIds: number[] };
const s: Record<string, HttpSession> = {};
const ids: Record<string, number> = {};
const family = unique('Quenby');
const otherFamily = unique('Quenby');
let here: { id: number; mrn: string };
let there: { id: number; mrn: string };
let gone: { id: number; mrn: string };

async function admit(who: HttpSession, bedId: number, familyName: string, givenName = 'Marguerite') {
  const res = await who.post('/api/patients', {
    givenName,
    familyName,
    mrn: unique('SR').toUpperCase().slice(0, 20),
    dateOfBirth: '1948-09-30',
    bedId,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()).patient as { id: number; mrn: string };
}

beforeAll(async () => {
  db = testDb();
  unit = await createUnit(db, 3);
  other = await createUnit(db, 2);
  const people = await signInPeople(db, {
    nurse: ['nurse', unit.unitId],
    charge: ['charge', unit.unitId],
    otherCharge: ['charge', other.unitId],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  });
  Object.assign(s, people.sessions);
  Object.assign(ids, people.ids);
  here = await admit(s.charge, unit.bedIds[0], family);
  gone = await admit(s.charge, unit.bedIds[1], family, 'Odile');
  expect((await s.charge.post(`/api/patients/${gone.id}/discharge`, {})).status).toBe(200);
  there = await admit(s.otherCharge, other.bedIds[0], otherFamily);
});
afterAll(async () => {
  await db.destroy();
});

const find = async (who: HttpSession, q: string, extra = '') => {
  const res = await who.get(`/api/patients/search?q=${encodeURIComponent(q)}${extra}`);
  expect(res.status, await res.clone().text()).toBe(200);
  return (await res.json()).results as { id: number; discharged: boolean; bedLabel: string }[];
};

describe('patient search', () => {
  it('is for clinical roles: 401 signed out, 403 for administrators, 400 naming q when too short', async () => {
    expect((await s.anon.get('/api/patients/search?q=quen')).status).toBe(401);
    expect((await s.admin.get('/api/patients/search?q=quen')).status).toBe(403);
    const res = await s.nurse.get('/api/patients/search?q=q');
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields.q).toMatch(/at least 2/);
  });

  it('finds by MRN, family name, given name and bed label, in the units the person may see', async () => {
    expect((await find(s.nurse, here.mrn)).map((r) => r.id)).toEqual([here.id]);
    expect((await find(s.nurse, family.toLowerCase())).map((r) => r.id)).toEqual([here.id]);
    expect((await find(s.nurse, `marg ${family}`)).map((r) => r.id)).toEqual([here.id]);
    const byBed = await find(s.nurse, 'F-1');
    expect(byBed.map((r) => r.id)).toContain(here.id);
    // A nurse sees her own unit only; an intensivist sees every unit.
    expect(await find(s.nurse, there.mrn)).toEqual([]);
    expect(await find(s.nurse, otherFamily)).toEqual([]);
    expect((await find(s.intensivist, there.mrn)).map((r) => r.id)).toEqual([there.id]);
    expect((await find(s.outreach, otherFamily)).map((r) => r.id)).toEqual([there.id]);
  });

  it('shows discharged patients only on request', async () => {
    expect(await find(s.nurse, gone.mrn)).toEqual([]);
    const r = await find(s.nurse, gone.mrn, '&discharged=include');
    expect(r).toEqual([expect.objectContaining({ id: gone.id, discharged: true, bedLabel: 'F-2' })]);
  });

  it('treats LIKE wildcards as plain text', async () => {
    expect(await find(s.intensivist, '%%')).toEqual([]);
    expect(await find(s.intensivist, '__')).toEqual([]);
  });
});

describe('audit reader', () => {
  it('is for administrators only, and names bad filters', async () => {
    expect((await s.anon.get('/api/admin/audit')).status).toBe(401);
    expect((await s.charge.get('/api/admin/audit')).status).toBe(403);
    const res = await s.admin.get('/api/admin/audit?from=2026-13-01&to=yesterday&pageSize=9999');
    expect(res.status).toBe(400);
    expect(Object.keys((await res.json()).error.fields).sort()).toEqual(['from', 'pageSize', 'to']);
    expect((await s.admin.get('/api/admin/audit?unit=NOSUCH')).status).toBe(400);
  });

  it('filters by person, action and patient (their obs too), pages, and shows times in the unit zone', async () => {
    // One charted obs for `here`, so the patient filter must gather patient and observation rows.
    const obs = await s.nurse.post(`/api/patients/${here.id}/observations`, {
      takenAt: new Date(Date.now() - 60_000).toISOString(),
      spo2: 95,
      heartRate: 80,
      respRate: 16,
      device: 'room_air',
      trace: 'clean',
    });
    expect(obs.status, await obs.clone().text()).toBe(201);

    let res = await s.admin.get(`/api/admin/audit?patient=${here.mrn}&unit=${unit.code}`);
    expect(res.status).toBe(200);
    let body = await res.json();
    expect(body.timeZone).toBe('Europe/London');
    expect(body.rows.map((r: { action: string }) => r.action).sort()).toEqual(['observation.create', 'patient.admit']);
    expect(body.rows[0].atLocal).toMatch(/^\d{1,2} [A-Z][a-z]{2} \d{4} \d{2}:\d{2}:\d{2}$/);

    res = await s.admin.get(`/api/admin/audit?actorId=${ids.charge}&action=patient.discharge`);
    body = await res.json();
    expect(body.total).toBe(1);
    expect(body.rows[0]).toMatchObject({ action: 'patient.discharge', entityId: String(gone.id), actorId: ids.charge });
    res = await s.admin.get(`/api/admin/audit?actorId=${ids.charge}&action=patient.`);
    expect((await res.json()).total).toBe(3); // two admissions and a discharge

    // (the charge's own sign-ins are audited too: keep to the patient actions)
    res = await s.admin.get(`/api/admin/audit?actorId=${ids.charge}&action=patient.&pageSize=2&page=2`);
    body = await res.json();
    expect(body.total).toBe(3);
    expect(body.rows).toHaveLength(1);

    expect((await (await s.admin.get('/api/admin/audit?patient=NO-SUCH-MRN')).json()).total).toBe(0);
  });

  it('reads date ranges as whole days in the unit zone', async () => {
    const actor = ids.admin;
    const at = new Date('2026-07-01T23:30:00Z'); // 00:30 on 2 July in London (BST)
    await db('audit_log').insert({
      actor_id: actor,
      action: 'test.zone_probe',
      entity: 'unit',
      entity_id: String(unit.unitId),
      before: null,
      after: null,
      at,
    });
    const q = (from: string, to: string) =>
      s.admin
        .get(`/api/admin/audit?action=test.zone_probe&from=${from}&to=${to}&unit=${unit.code}`)
        .then((r) => r.json());
    expect((await q('2026-07-02', '2026-07-02')).total).toBe(1);
    expect((await q('2026-07-01', '2026-07-01')).total).toBe(0);
  });

  it('downloads the filtered rows as CSV with unit-zone times', async () => {
    const res = await s.admin.get(
      `/api/admin/audit?actorId=${ids.charge}&action=patient.&unit=${unit.code}&format=csv`,
    );
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/text\/csv/);
    expect(res.headers.get('content-disposition')).toMatch(/attachment/);
    const lines = (await res.text()).trim().split('\r\n');
    expect(lines[0]).toBe('time (Europe/London),person,e-mail,action,entity,entity id,before,after');
    expect(lines).toHaveLength(4);
    expect(lines.slice(1).every((l) => /^\d{1,2} [A-Z][a-z]{2} \d{4} \d{2}:\d{2}:\d{2},/.test(l))).toBe(true);
  });
});
