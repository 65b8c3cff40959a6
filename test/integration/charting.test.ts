import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { countRows, createAdmittedPatient, rebuildPatientRollup, unique } from '../support/db.ts';
import { expectEachRefused, type RefusalCase } from '../support/refusals.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, other, s, ids } = useWard({
  beds: 4,
  otherBeds: 2,
  people: {
    charge: ['charge', 'unit'],
    nurse: ['nurse', 'unit'],
    nurse2: ['nurse', 'unit'],
    otherNurse: ['nurse', 'other'],
    otherCharge: ['charge', 'other'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();

async function admit(bedIndex: number, extra: Record<string, unknown> = {}) {
  const res = await s.charge.post('/api/patients', {
    givenName: 'Isolde',
    familyName: unique('Fixture'),
    mrn: unique('MRN').slice(0, 20).toUpperCase(),
    dateOfBirth: '1961-04-12',
    bedId: unit.bedIds[bedIndex],
    ...extra,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()).patient as { id: number; mrn: string; bed: { label: string } | null };
}

function obs(extra: Record<string, unknown> = {}) {
  return {
    takenAt: minutesAgo(1),
    spo2: 94,
    heartRate: 88,
    respRate: 18,
    device: 'nasal_cannula',
    flowLpm: 2,
    fio2: 0.28,
    trace: 'clean',
    systolic: 124,
    temperature: 37.1,
    consciousness: 'alert',
    ...extra,
  };
}

describe('patients: admit, move, discharge', () => {
  it('lets only the charge nurse admit, and refuses everyone else by role on the server', async () => {
    const body = { givenName: 'A', familyName: 'B', mrn: 'ROLE-1', dateOfBirth: '1970-01-01', bedId: unit.bedIds[3] };
    expect((await s.anon.post('/api/patients', body)).status).toBe(401);
    for (const who of ['nurse', 'intensivist', 'outreach', 'admin'])
      expect((await s[who].post('/api/patients', body)).status, who).toBe(403);
    expect(await db('patients').where({ mrn: 'ROLE-1' }).first()).toBeUndefined();
  });

  it('refuses bad input with each field named, storing nothing', async () => {
    const before = await countRows(db, 'patients');
    const res = await s.charge.post('/api/patients', {
      givenName: '',
      familyName: 'X',
      mrn: '!',
      dateOfBirth: '2199-01-01',
      bedId: 'one',
    });
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(Object.keys(error.fields).sort()).toEqual(['bedId', 'dateOfBirth', 'givenName', 'mrn']);
    expect(error.fields.dateOfBirth).toMatch(/future/);
    expect(await countRows(db, 'patients')).toBe(before);
    expect(await countRows(db, 'bed_stays')).toBeGreaterThanOrEqual(0);
  });

  it('admits to a free bed, refuses an occupied one, moves and discharges with who and when', async () => {
    const p = await admit(0);
    expect(p.bed?.label).toBe('F-1');
    const clash = await s.charge.post('/api/patients', {
      givenName: 'C',
      familyName: 'D',
      mrn: unique('CL'),
      dateOfBirth: '1980-02-02',
      bedId: unit.bedIds[0],
    });
    expect(clash.status).toBe(409);
    expect((await clash.json()).error.code).toBe('bed_occupied');

    expect((await s.nurse.post(`/api/patients/${p.id}/move`, { bedId: unit.bedIds[1] })).status).toBe(403);
    const moved = await s.charge.post(`/api/patients/${p.id}/move`, { bedId: unit.bedIds[1] });
    expect(moved.status).toBe(200);
    expect((await moved.json()).patient.bed.label).toBe('F-2');

    const discharged = await s.charge.post(`/api/patients/${p.id}/discharge`, {});
    expect(discharged.status).toBe(200);
    expect((await discharged.json()).patient.bed).toBeNull();

    const detail = await (await s.charge.get(`/api/patients/${p.id}`)).json();
    expect(detail.stays.map((x: { endReason: string }) => x.endReason)).toEqual(['discharged', 'moved']);
    expect(detail.stays[0].endedBy).toBe('Fixture charge');
    expect(detail.can.chart).toBe(false);
    const late = await s.nurse.post(`/api/patients/${p.id}/observations`, obs());
    expect(late.status).toBe(409);
    const audit = await db('audit_log')
      .where({ entity: 'patient', entity_id: String(p.id) })
      .pluck('action');
    expect(audit).toEqual(['patient.admit', 'patient.move', 'patient.discharge']);
  });

  it("shows a unit's patients to its own staff and to roles that span units, not to others", async () => {
    const p = await admit(2);
    const url = `/api/patients?unit=${unit.code}`;
    for (const who of ['nurse', 'charge', 'intensivist', 'outreach']) {
      const res = await s[who].get(url);
      expect(res.status, who).toBe(200);
      expect(
        (await res.json()).patients.map((x: { id: number }) => x.id),
        who,
      ).toContain(p.id);
    }
    expect((await s.otherNurse.get(url)).status).toBe(403);
    expect((await s.admin.get(url)).status).toBe(403);
    expect((await s.otherNurse.get(`/api/patients/${p.id}`)).status).toBe(403);
    expect((await s.admin.get(`/api/patients/${p.id}`)).status).toBe(403);
    const asIntensivist = await (await s.intensivist.get(`/api/patients/${p.id}`)).json();
    expect(asIntensivist.can).toEqual({ chart: false, order: true, admit: false });
    const asNurse = await (await s.nurse.get(`/api/patients/${p.id}`)).json();
    expect(asNurse.can).toEqual({ chart: true, order: false, admit: false });
    expect(asNurse.band).toBeNull();
    await s.charge.post(`/api/patients/${p.id}/discharge`, {});
  });
});

describe('target orders', () => {
  let patientId: number;
  beforeAll(async () => {
    patientId = (await admit(3)).id;
  });
  afterAll(async () => {
    await s.charge.post(`/api/patients/${patientId}/discharge`, {});
  });

  it('only the intensivist orders; the order history keeps every order with who and when; a stale order gets 409', async () => {
    const order = {
      low: 92,
      high: 96,
      preset: 'tsanz_most',
      reason: 'Admission target',
      news2Scale: 1,
      basedOnOrderId: null,
    };
    for (const who of ['nurse', 'charge', 'outreach', 'admin'])
      expect((await s[who].post(`/api/patients/${patientId}/targets`, order)).status, who).toBe(403);
    const first = await s.intensivist.post(`/api/patients/${patientId}/targets`, order);
    expect(first.status).toBe(201);
    const firstId = (await first.json()).order.id;

    const stale = await s.intensivist.post(`/api/patients/${patientId}/targets`, {
      ...order,
      low: 88,
      high: 92,
      preset: null,
      news2Scale: 2,
      basedOnOrderId: null,
    });
    expect(stale.status).toBe(409);
    expect((await stale.json()).error.code).toBe('stale_order');

    const second = await s.intensivist.post(`/api/patients/${patientId}/targets`, {
      low: 88,
      high: 92,
      preset: 'bts_hypercapnic',
      reason: 'CO₂ retention on gas',
      news2Scale: 2,
      basedOnOrderId: firstId,
    });
    expect(second.status).toBe(201);
    const history = (await (await s.nurse.get(`/api/patients/${patientId}/targets`)).json()).orders;
    expect(history.map((o: { low: number; high: number }) => `${o.low}-${o.high}`)).toEqual(['88-92', '92-96']);
    expect(history[0]).toMatchObject({ supersedesId: firstId, orderedBy: 'Fixture intensivist', news2Scale: 2 });
    expect(
      await db('audit_log')
        .where({ entity: 'patient', entity_id: String(patientId), action: 'target.order' })
        .count({ n: '*' })
        .first(),
    ).toEqual({ n: 2 });
  });

  it('refuses a band that is too narrow, out of range, or Scale 2 above 92 without a reason — storing nothing', async () => {
    await expectEachRefused(
      db,
      'target_orders',
      [
        [{ low: 95, high: 96 }, 'high'],
        [{ low: 79, high: 90 }, 'low'],
        [{ low: 92, high: 101 }, 'high'],
        [{ low: 92, high: 96, news2Scale: 2 }, 'scaleReason'],
        [{ low: 92, high: 96, reason: '' }, 'reason'],
        [{ low: 92, high: 96, preset: 'bts_most' }, 'preset'],
      ],
      (patch) =>
        s.intensivist.post(`/api/patients/${patientId}/targets`, {
          reason: 'Adjusting',
          news2Scale: 1,
          basedOnOrderId: null,
          ...patch,
        }),
    );
  });
});

describe('obs entry, corrections and entered in error', () => {
  let patientId: number;
  beforeAll(async () => {
    ({ patientId } = await createAdmittedPatient(db, { bedId: other.bedIds[0], since: Date.now() - 6 * 3_600_000 }));
    // Move the fixture staff's view: this patient is in `other`, charted by the other unit's nurse.
  });

  it('charts a valid obs: 201, FiO₂ typed as % stored as a fraction, audited', async () => {
    const res = await s.otherNurse.post(
      `/api/patients/${patientId}/observations`,
      obs({ fio2: 40, device: 'simple_mask', flowLpm: 6 }),
    );
    expect(res.status, await res.clone().text()).toBe(201);
    const { observation } = await res.json();
    expect(observation.fio2).toBe(0.4);
    expect(observation.fio2Estimated).toBe(false);
    const row = await db('observations').where({ id: observation.id }).first();
    expect(Number(row.fio2)).toBe(0.4);
    expect(row.recorded_by).toBe(ids.otherNurse);
    expect(
      await db('audit_log')
        .where({ entity: 'observation', entity_id: String(observation.id), action: 'observation.create' })
        .first(),
    ).toBeTruthy();
  });

  it('estimates FiO₂ from device and flow when not charted, and says it is an estimate', async () => {
    const res = await s.otherNurse.post(
      `/api/patients/${patientId}/observations`,
      obs({ fio2: undefined, device: 'nasal_cannula', flowLpm: 3 }),
    );
    const { observation } = await res.json();
    expect(observation.fio2).toBeCloseTo(0.33, 3); // 0.21 + 0.04 × 3 L/min (common practice, BTS 2017 summaries)
    expect(observation.fio2Estimated).toBe(true);
  });

  it('refuses implausible values with the field and reason, storing nothing', async () => {
    const cases: RefusalCase[] = [
      [{ spo2: 101 }, 'spo2', /over 100/],
      [{ heartRate: 301 }, 'heartRate', /over 300/],
      [{ fio2: 0.15 }, 'fio2', /under 21/],
      [{ fio2: 15 }, 'fio2', /under 21/],
      [{ takenAt: minutesAgo(-10) }, 'takenAt', /future/],
      [{ takenAt: minutesAgo(4 * 60 + 5) }, 'takenAt', /4 hours/],
      [{ device: 'ventilator', fio2: undefined, flowLpm: undefined }, 'fio2', /never estimated/],
      [{ device: 'jetpack' }, 'device', /device/],
      [{ spo2: undefined }, 'spo2', /SpO₂/],
    ];
    await expectEachRefused(db, 'observations', cases, (patch) =>
      s.otherNurse.post(`/api/patients/${patientId}/observations`, obs(patch)),
    );
  });

  it('accepts back-dating within 4 h and SpO₂ under 70 with the calibrated-range notice', async () => {
    const back = await s.otherNurse.post(
      `/api/patients/${patientId}/observations`,
      obs({ takenAt: minutesAgo(3 * 60 + 50) }),
    );
    expect(back.status).toBe(201);
    const low = await s.otherNurse.post(`/api/patients/${patientId}/observations`, obs({ spo2: 65 }));
    expect(low.status).toBe(201);
    expect((await low.json()).observation.notices).toEqual([
      'Below calibrated range — confirm with arterial blood gas',
    ]);
  });

  it("lets only the patient's unit nurses and charge nurse chart", async () => {
    for (const who of ['nurse', 'charge', 'intensivist', 'outreach', 'admin']) {
      expect((await s[who].post(`/api/patients/${patientId}/observations`, obs())).status, who).toBe(403);
    }
    expect((await s.anon.post(`/api/patients/${patientId}/observations`, obs())).status).toBe(401);
  });

  it('a correction keeps the original, struck through with who, when and why', async () => {
    const created = (
      await (await s.otherNurse.post(`/api/patients/${patientId}/observations`, obs({ spo2: 84 }))).json()
    ).observation;
    const res = await s.otherNurse.post(`/api/observations/${created.id}/correct`, {
      reason: 'Probe was on the wrong finger',
      obs: obs({ spo2: 94, takenAt: created.takenAt }),
    });
    expect(res.status).toBe(201);
    const corrected = (await res.json()).observation;
    expect(corrected.replacesId).toBe(created.id);

    const original = await db('observations').where({ id: created.id }).first();
    expect(original.spo2).toBe(84);
    expect(original.status).toBe('superseded');
    expect(original.status_reason).toBe('Probe was on the wrong finger');

    const page = await (await s.otherNurse.get(`/api/patients/${patientId}/observations?pageSize=50`)).json();
    const shown = page.items.find((o: { id: number }) => o.id === created.id);
    expect(shown).toMatchObject({
      status: 'superseded',
      replacedById: corrected.id,
      statusBy: 'Fixture nurse',
      spo2: 84,
    });

    expect(
      (await s.otherNurse.post(`/api/observations/${created.id}/correct`, { reason: 'again', obs: obs() })).status,
    ).toBe(409);
    const audit = await db('audit_log')
      .where({ entity: 'observation', entity_id: String(created.id), action: 'observation.correct' })
      .first();
    const before = typeof audit.before === 'string' ? JSON.parse(audit.before) : audit.before;
    expect(before.spo2).toBe(84);
  });

  it('a nurse corrects only their own entries; the charge nurse any in the unit', async () => {
    const mine = (await (await s.otherCharge.post(`/api/patients/${patientId}/observations`, obs())).json())
      .observation;
    const byNurse = await s.otherNurse.post(`/api/observations/${mine.id}/entered-in-error`, {
      reason: 'Wrong patient',
    });
    expect(byNurse.status).toBe(403);
    const nurseObs = (await (await s.otherNurse.post(`/api/patients/${patientId}/observations`, obs())).json())
      .observation;
    expect((await s.otherCharge.post(`/api/observations/${nurseObs.id}/entered-in-error`, {})).status).toBe(400);
    const marked = await s.otherCharge.post(`/api/observations/${nurseObs.id}/entered-in-error`, {
      reason: 'Charted on the wrong patient',
    });
    expect(marked.status).toBe(200);
    expect((await marked.json()).observation).toMatchObject({
      status: 'entered_in_error',
      statusReason: 'Charted on the wrong patient',
    });
    expect(await db('observations').where({ id: nurseObs.id }).first()).toBeTruthy();
  });
});

describe('series for the bed chart', () => {
  let patientId: number;
  const hour = 3_600_000;
  beforeAll(async () => {
    const now = Date.now();
    const { patientId: id } = await createAdmittedPatient(db, { bedId: other.bedIds[1], since: now - 80 * hour });
    patientId = id;
    await db('target_orders').insert([
      {
        patient_id: id,
        low: 92,
        high: 96,
        reason: 'first',
        ordered_by: ids.intensivist,
        ordered_at: new Date(now - 75 * hour),
      },
      {
        patient_id: id,
        low: 88,
        high: 92,
        reason: 'second',
        ordered_by: ids.intensivist,
        ordered_at: new Date(now - 3 * hour),
      },
    ]);
    // 72 h of device readings every 10 s (25,920 rows), with a dip to 85 % between 2 h and 1 h ago.
    const rows = [];
    for (let t = now - 72 * hour; t < now; t += 10_000) {
      const dip = t > now - 2 * hour && t < now - hour;
      rows.push({
        patient_id: id,
        taken_at: new Date(t),
        source: 'device',
        spo2: dip ? 85 : 94,
        heart_rate: 80,
        trace: 'clean',
      });
    }
    for (let i = 0; i < rows.length; i += 5000) await db('observations').insert(rows.slice(i, i + 5000));
    await rebuildPatientRollup(db, id);
  });

  it('downsamples 72 h to at most 1,500 points a line and keeps the band steps', async () => {
    const res = await s.otherNurse.get(`/api/patients/${patientId}/series?hours=72`);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.rawCounts.spo2).toBeGreaterThan(25_000);
    expect(body.spo2.length).toBeLessThanOrEqual(1500);
    expect(body.heartRate.length).toBeLessThanOrEqual(1500);
    expect(body.bands.map((b: { low: number; high: number }) => `${b.low}-${b.high}`)).toEqual(['92-96', '88-92']);
    // The dip must survive downsampling.
    expect(Math.min(...body.spo2.map((p: { v: number }) => p.v))).toBe(85);
  });

  it('computes the derived figures with the computation modules: totals add up to the window', async () => {
    const body = await (await s.intensivist.get(`/api/patients/${patientId}/series?hours=6`)).json();
    const c = body.derived.compliance;
    expect(c.windowMin).toBe(360);
    expect(c.inBandMin + c.belowMin + c.aboveMin + c.untrustedMin + c.noReadingMin + c.noBandMin).toBeCloseTo(360, 0);
    // 88–92 from 3 h ago: 94 % is above band; the dip to 85 % (1 h) is below by 3 points → 180 %·min.
    expect(c.belowMin).toBeCloseTo(60, 0);
    expect(c.burdenPctMin).toBeCloseTo(180, -1);
    expect(c.aboveMin).toBeCloseTo(120, 0);
    expect(body.derived.latest.spo2).toBe(94);
  });

  it('scores NEWS2 from the newest full charted obs (RCP 2017 chart)', async () => {
    const res = await s.otherNurse.post(
      `/api/patients/${patientId}/observations`,
      obs({ spo2: 94, device: 'simple_mask', flowLpm: 6, fio2: 0.4 }),
    );
    expect(res.status).toBe(201);
    const body = await (await s.otherNurse.get(`/api/patients/${patientId}/series?hours=6`)).json();
    // SpO₂ 94 % on Scale 1 scores 1, supplemental oxygen 2; RR 18, SBP 124, pulse 88, alert, 37.1 °C score 0.
    expect(body.derived.latest.news2).toMatchObject({
      total: 3,
      complete: true,
      missing: [],
      response: 'low',
      scale: 1,
    });
  });

  it('refuses a window that is not 6, 12, 24 or 72 h', async () => {
    const res = await s.otherNurse.get(`/api/patients/${patientId}/series?hours=5`);
    expect(res.status).toBe(400);
    expect((await res.json()).error.fields).toHaveProperty('hours');
  });
});
