/** Issue 10 point 6: the outreach queue's data — SpO₂ now with its time, a 30-minute trend, filters, and closed ones of 7 days. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { HttpSession, signedIn } from '../support/app.ts';
import { createUnit, createUser, testDb, unique } from '../support/db.ts';

let db: Knex;
let unit: { unitId: number; code: string; bedIds: number[] };
const s: Record<string, HttpSession> = {};
let intensivistId: number;

beforeAll(async () => {
  db = testDb();
  unit = await createUnit(db, 3);
  await db('unit_settings').insert({ unit_id: unit.unitId, outreach_emails: `${unique('q')}@fixture.example` });
  const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
  s.nurse = await signedIn(nurse.email, nurse.password);
  const outreach = await createUser(db, { role: 'outreach' });
  s.outreach = await signedIn(outreach.email, outreach.password);
  intensivistId = (await createUser(db, { role: 'intensivist' })).id;
});
afterAll(async () => { await db.destroy(); });

async function belowBandPatient(bedIndex: number) {
  const [id] = await db('patients').insert({ mrn: unique('Q').slice(0, 20), given_name: 'Quin', family_name: unique('Queue'), date_of_birth: '1960-02-02' });
  await db('bed_stays').insert({ patient_id: id, bed_id: unit.bedIds[bedIndex], started_at: new Date(Date.now() - 6 * 3_600_000) });
  await db('target_orders').insert({ patient_id: id, low: 92, high: 96, reason: 'fixture', ordered_by: intensivistId, ordered_at: new Date(Date.now() - 5 * 3_600_000) });
  for (const [spo2, minsAgo] of [[90, 25], [89, 12], [88, 2]] as const) {
    const res = await s.nurse.post(`/api/patients/${id}/observations`, {
      takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(), spo2, heartRate: 100, respRate: 22, device: 'simple_mask', flowLpm: 6, fio2: 0.4, trace: 'clean',
    });
    expect(res.status).toBe(201);
  }
  return id as number;
}

describe('outreach queue data', () => {
  it('open escalations carry SpO₂ now with its time and the last 30 minutes; closed ones of 7 days carry outcome, who and minutes', async () => {
    const p = await belowBandPatient(0);
    const open = await (await s.outreach.get(`/api/escalations?state=open&unit=${unit.code}`)).json();
    const e = open.escalations.find((x: { patient: { id: number } }) => x.patient.id === p);
    expect(e.current).toMatchObject({ spo2: 88, source: 'charted', trusted: true });
    expect(Date.now() - Date.parse(e.current.at)).toBeLessThan(3 * 60_000);
    expect(e.trend.map((x: { v: number }) => x.v)).toEqual([90, 89, 88]); // 25 min ago and nearer; one point a minute
    expect(e.unit.timeZone).toBe('Europe/London');

    // Kind filter.
    const probes = await (await s.outreach.get(`/api/escalations?state=open&unit=${unit.code}&kind=probe_check`)).json();
    expect(probes.escalations.some((x: { patient: { id: number } }) => x.patient.id === p)).toBe(false);

    expect((await s.outreach.post(`/api/escalations/${e.id}/claim`)).status).toBe(200);
    expect((await s.outreach.post(`/api/escalations/${e.id}/close`, { outcome: 'reviewed_by_outreach' })).status).toBe(200);
    // An old closed one (8 days ago) is not in the Closed tab.
    const old = await belowBandPatient(1);
    const oldEsc = await db('escalations').where({ patient_id: old }).first();
    await db('escalations').where({ id: oldEsc.id }).update({ state: 'closed', closed_at: new Date(Date.now() - 8 * 24 * 3_600_000), outcome: 'other' });
    const closed = await (await s.outreach.get(`/api/escalations?state=closed&unit=${unit.code}`)).json();
    const c = closed.escalations.find((x: { id: number }) => x.id === e.id);
    expect(c).toMatchObject({ outcome: 'reviewed_by_outreach', outcomeLabel: 'Reviewed by outreach', raisedToClaimedMin: 0, claimedToClosedMin: 0 });
    expect(c.closedBy).toMatch(/^Fixture outreach/);
    expect(closed.escalations.some((x: { id: number }) => x.id === oldEsc.id)).toBe(false);
  });
});
