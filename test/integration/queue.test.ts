/** Issue 10 point 6: the outreach queue's data — SpO₂ now with its time, a 30-minute trend, filters, and closed ones of 7 days. */
import { beforeAll, describe, expect, it } from 'vitest';
import { createAdmittedPatient, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({
  beds: 3,
  people: {
    nurse: ['nurse', 'unit'],
    outreach: ['outreach', null],
    intensivist: ['intensivist', null],
    charge: ['charge', 'unit'],
  },
});
beforeAll(async () => {
  await db('unit_settings').insert({ unit_id: unit.unitId, outreach_emails: `${unique('q')}@fixture.example` });
});

async function belowBandPatient(bedIndex: number) {
  const { patientId: id } = await createAdmittedPatient(db, {
    bedId: unit.bedIds[bedIndex],
    since: Date.now() - 6 * 3_600_000,
    band: { low: 92, high: 96, orderedBy: ids.intensivist, orderedAt: Date.now() - 5 * 3_600_000 },
  });
  for (const [spo2, minsAgo] of [
    [90, 25],
    [89, 12],
    [88, 2],
  ] as const) {
    const res = await s.nurse.post(`/api/patients/${id}/observations`, {
      takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(),
      spo2,
      heartRate: 100,
      respRate: 22,
      device: 'simple_mask',
      flowLpm: 6,
      fio2: 0.4,
      trace: 'clean',
    });
    expect(res.status).toBe(201);
  }
  return id;
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
    const probes = await (
      await s.outreach.get(`/api/escalations?state=open&unit=${unit.code}&kind=probe_check`)
    ).json();
    expect(probes.escalations.some((x: { patient: { id: number } }) => x.patient.id === p)).toBe(false);

    expect((await s.outreach.post(`/api/escalations/${e.id}/claim`)).status).toBe(200);
    expect((await s.outreach.post(`/api/escalations/${e.id}/close`, { outcome: 'reviewed_by_outreach' })).status).toBe(
      200,
    );
    // An old closed one (8 days ago) is not in the Closed tab.
    const old = await belowBandPatient(1);
    const oldEsc = await db('escalations').where({ patient_id: old }).first();
    await db('escalations')
      .where({ id: oldEsc.id })
      .update({ state: 'closed', closed_at: new Date(Date.now() - 8 * 24 * 3_600_000), outcome: 'other' });
    const closed = await (await s.outreach.get(`/api/escalations?state=closed&unit=${unit.code}`)).json();
    const c = closed.escalations.find((x: { id: number }) => x.id === e.id);
    expect(c).toMatchObject({
      outcome: 'reviewed_by_outreach',
      outcomeLabel: 'Reviewed by outreach',
      raisedToClaimedMin: 0,
      claimedToClosedMin: 0,
    });
    expect(c.closedBy).toMatch(/^Fixture outreach/);
    expect(closed.escalations.some((x: { id: number }) => x.id === oldEsc.id)).toBe(false);
  });
});

describe('what the signed-in person may do with each escalation (can, decided on the server)', () => {
  type Can = { claim: boolean; close: boolean };
  const canIn = async (who: string, state: 'open' | 'closed', patientId: number): Promise<Can> => {
    const list = await (await s[who].get(`/api/escalations?state=${state}&unit=${unit.code}`)).json();
    return list.escalations.find((x: { patient: { id: number } }) => x.patient.id === patientId).can;
  };
  const tileCan = async (who: string, bedId: number): Promise<Can> => {
    const board = await (await s[who].get(`/api/board?unit=${unit.code}`)).json();
    return board.tiles.find((t: { bedId: number }) => t.bedId === bedId).can;
  };

  it('claim while raised (nurses, charge nurses, outreach); close until closed (charge nurses, outreach); intensivists neither', async () => {
    const p = await belowBandPatient(2);
    const bedId = unit.bedIds[2];
    expect(await canIn('nurse', 'open', p)).toEqual({ claim: true, close: false });
    expect(await canIn('charge', 'open', p)).toEqual({ claim: true, close: true });
    expect(await canIn('outreach', 'open', p)).toEqual({ claim: true, close: true });
    expect(await canIn('intensivist', 'open', p)).toEqual({ claim: false, close: false });

    // A board tile offers the claim to the charge nurse and to the bed's own nurse only.
    expect(await tileCan('charge', bedId)).toEqual({ claim: true });
    expect(await tileCan('nurse', bedId)).toEqual({ claim: false });
    expect(await tileCan('outreach', bedId)).toEqual({ claim: false });
    expect(await tileCan('intensivist', bedId)).toEqual({ claim: false });
    expect((await s.charge.put(`/api/beds/${bedId}/assignment`, { nurseId: ids.nurse })).status).toBe(200);
    expect(await tileCan('nurse', bedId)).toEqual({ claim: true });

    // Claimed: nobody may claim it again (the server refuses too); closing stays with charge nurses and outreach.
    const id = (await db('escalations').where({ patient_id: p, kind: 'below_band' }).first()).id;
    const claimed = await s.nurse.post(`/api/escalations/${id}/claim`);
    expect(claimed.status).toBe(200);
    expect((await claimed.json()).can).toEqual({ claim: false, close: false });
    expect(await canIn('nurse', 'open', p)).toEqual({ claim: false, close: false });
    expect(await canIn('charge', 'open', p)).toEqual({ claim: false, close: true });
    expect(await canIn('outreach', 'open', p)).toEqual({ claim: false, close: true });
    expect(await canIn('intensivist', 'open', p)).toEqual({ claim: false, close: false });
    expect(await tileCan('charge', bedId)).toEqual({ claim: false });
    expect((await (await s.charge.get(`/api/escalations/${id}`)).json()).can).toEqual({ claim: false, close: true });
    expect((await s.charge.post(`/api/escalations/${id}/claim`)).status).toBe(409);
    expect((await s.nurse.post(`/api/escalations/${id}/close`, { outcome: 'treated_at_bedside' })).status).toBe(403);

    // Closed: nothing more for anyone.
    const closed = await s.charge.post(`/api/escalations/${id}/close`, { outcome: 'treated_at_bedside' });
    expect((await closed.json()).can).toEqual({ claim: false, close: false });
    for (const who of ['nurse', 'charge', 'outreach', 'intensivist'])
      expect(await canIn(who, 'closed', p), who).toEqual({ claim: false, close: false });
  });

  it('the board as a whole: charge nurses assign nurses; nurses and charge nurses may keep to their own beds', async () => {
    const boardCan = async (who: string) => (await (await s[who].get(`/api/board?unit=${unit.code}`)).json()).can;
    expect(await boardCan('charge')).toEqual({ assignNurses: true, filterMine: true });
    expect(await boardCan('nurse')).toEqual({ assignNurses: false, filterMine: true });
    expect(await boardCan('outreach')).toEqual({ assignNurses: false, filterMine: false });
    expect(await boardCan('intensivist')).toEqual({ assignNurses: false, filterMine: false });
    // What the board offers, the server allows, and no more.
    expect((await s.nurse.put(`/api/beds/${unit.bedIds[0]}/assignment`, { nurseId: ids.nurse })).status).toBe(403);
  });
});
