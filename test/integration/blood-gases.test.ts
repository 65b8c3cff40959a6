import { describe, expect, it } from 'vitest';
import { unique } from '../support/db.ts';
import { expectEachRefused, type RefusalCase } from '../support/refusals.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s } = useWard({
  beds: 6,
  otherBeds: 1,
  people: {
    charge: ['charge', 'unit'],
    nurse: ['nurse', 'unit'],
    nurse2: ['nurse', 'unit'],
    otherNurse: ['nurse', 'other'],
    intensivist: ['intensivist', null],
    outreach: ['outreach', null],
    admin: ['admin', null],
  },
});

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();

/** Admits a patient and moves the admission back 3 h, so gases can be sampled after it. */
async function admit(bedIndex: number) {
  const res = await s.charge.post('/api/patients', {
    givenName: 'Maren',
    familyName: unique('Gas'),
    mrn: unique('BG').toUpperCase(),
    dateOfBirth: '1958-07-02',
    bedId: unit.bedIds[bedIndex],
  });
  expect(res.status, await res.clone().text()).toBe(201);
  const patient = (await res.json()).patient as { id: number };
  await db('bed_stays')
    .where({ patient_id: patient.id })
    .update({ started_at: new Date(Date.now() - 3 * 3_600_000) });
  return patient.id;
}

const gas = (extra: Record<string, unknown> = {}) => ({
  sampledAt: minutesAgo(20),
  sampleType: 'arterial',
  gasUnit: 'kPa',
  ph: 7.36,
  pao2: 7.9,
  paco2: 5.9,
  sao2: 86,
  hco3: 24.1,
  baseExcess: -1.2,
  lactate: 1.4,
  hb: 128,
  fio2: 0.35,
  ...extra,
});

describe('blood gases: charting, pairs and occult hypoxaemia', () => {
  it('charts a gas, stores mmHg, prefills SpO₂ from the nearest trusted reading, flags occult hypoxaemia and raises the bedside task in the same transaction', async () => {
    const id = await admit(0);
    // A noisy reading 10 s from the sample (untrusted, skipped) and a clean one 60 s away.
    expect(
      (
        await s.nurse.post(`/api/patients/${id}/observations`, {
          takenAt: minutesAgo(20.5),
          spo2: 93,
          device: 'simple_mask',
          flowLpm: 6,
          fio2: 0.35,
          trace: 'clean',
        })
      ).status,
    ).toBe(201);
    expect(
      (
        await s.nurse.post(`/api/patients/${id}/observations`, {
          takenAt: new Date(Date.parse(minutesAgo(20)) + 10_000).toISOString(),
          spo2: 99,
          device: 'simple_mask',
          flowLpm: 6,
          fio2: 0.35,
          trace: 'noisy',
        })
      ).status,
    ).toBe(201);
    const sampledAt = minutesAgo(20);
    const near = await (
      await s.nurse.get(`/api/patients/${id}/blood-gases/nearest-spo2?at=${encodeURIComponent(sampledAt)}`)
    ).json();
    expect(near.nearest.spo2).toBe(93);

    const res = await s.nurse.post(`/api/patients/${id}/blood-gases`, gas({ sampledAt }));
    expect(res.status, await res.clone().text()).toBe(201);
    const body = await res.json();
    expect(body.flags).toEqual(['occult_hypoxaemia']);
    expect(body.bloodGas.spo2AtSample).toBe(93);
    expect(body.bloodGas.spo2Source).toBe('nearest_reading');
    // 7.9 kPa × 7.50062 = 59.3 mmHg; P/F 59.3 / 0.35 = 169 → the Berlin moderate band (JAMA 2012).
    expect(body.bloodGas.pao2MmHg).toBe(59.3);
    expect(body.derived.pf).toBe(169);
    expect(body.derived.berlinBand).toBe('moderate');
    expect(body.bloodGas.hbGdl).toBe(12.8);
    expect(body.derived.spo2Difference).toBe(7);
    const row = await db('blood_gases').where({ id: body.bloodGas.id }).first();
    expect(Number(row.paco2_mmhg)).toBe(44.3);
    expect(row.entered_unit).toBe('kPa');
    expect(
      await db('audit_log')
        .where({ entity: 'blood_gas', entity_id: String(body.bloodGas.id), action: 'blood_gas.create' })
        .first(),
    ).toBeDefined();

    const esc = await db('escalations').where({ patient_id: id, kind: 'occult_hypoxaemia' });
    expect(esc).toHaveLength(1);
    expect(esc[0].state).toBe('raised');
    expect(await db('mail_outbox').where({ escalation_id: esc[0].id }).first()).toBeUndefined(); // a bedside task: not e-mailed

    // A second occult pair does not open a second task.
    expect(
      (
        await s.nurse.post(
          `/api/patients/${id}/blood-gases`,
          gas({ sampledAt: minutesAgo(5), spo2AtSample: 95, sao2: 85 }),
        )
      ).status,
    ).toBe(201);
    expect(
      await db('escalations').where({ patient_id: id, kind: 'occult_hypoxaemia' }).whereNot('state', 'closed'),
    ).toHaveLength(1);

    // The board tile, the queue and the list carry it.
    const board = await (await s.charge.get(`/api/board?unit=${unit.code}`)).json();
    const tile = board.tiles.find((t: { patient: { id: number } | null }) => t.patient?.id === id);
    expect(tile.occultHypoxaemia).toMatchObject({ sao2: 86, spo2AtSample: 93, state: 'raised' });
    expect(tile.sentence).toMatch(/Occult hypoxaemia/);
    const queue = await (await s.nurse.get(`/api/escalations?patient=${id}`)).json();
    expect(queue.escalations.map((e: { kind: string }) => e.kind)).toContain('occult_hypoxaemia');
    const list = await (await s.outreach.get(`/api/patients/${id}/blood-gases`)).json();
    expect(list.bloodGases).toHaveLength(2);
    expect(list.gasUnit).toBe('kPa');
    expect(list.occultCount).toBe(2);
    expect(list.bias).toEqual({ median: 8.5, pairs: 2 }); // median of 93 − 86 = 7 and 95 − 85 = 10
    const series = await (await s.nurse.get(`/api/patients/${id}/series?hours=6`)).json();
    expect(series.bloodGases.map((g: { sao2: number; occult: boolean }) => [g.sao2, g.occult])).toEqual([
      [86, true],
      [85, true],
    ]);
  });

  it('does not flag when SpO₂ read under 92, nor pair a venous sample', async () => {
    const id = await admit(1);
    const a = await (await s.nurse.post(`/api/patients/${id}/blood-gases`, gas({ spo2AtSample: 91, sao2: 85 }))).json();
    expect(a.flags).toEqual([]);
    expect(a.bloodGas.spo2Source).toBe('entered');
    const v = await (
      await s.nurse.post(
        `/api/patients/${id}/blood-gases`,
        gas({ sampleType: 'venous', pao2: 5.1, spo2AtSample: 96, sao2: 70 }),
      )
    ).json();
    expect(v.flags).toEqual([]);
    expect(v.derived.pf).toBeNull();
    expect(await db('escalations').where({ patient_id: id, kind: 'occult_hypoxaemia' })).toHaveLength(0);
  });

  it('refuses bad input with the field named and stores nothing', async () => {
    const id = await admit(2);
    const cases: RefusalCase[] = [
      [{ ph: 6.4 }, 'ph', /pH under 6.5/],
      [{ ph: 8.2 }, 'ph', /pH over 8/],
      [{ pao2: 150 }, 'pao2', /over 106.7 kPa/],
      [{ gasUnit: 'mmHg', pao2: 80, paco2: 400 }, 'paco2', /over 200 mmHg/],
      [{ sao2: 101 }, 'sao2', /over 100/],
      [{ sampledAt: new Date(Date.now() + 30 * 60_000).toISOString() }, 'sampledAt', /future/],
      [{ sampledAt: minutesAgo(5 * 60) }, 'sampledAt', /before admission/],
    ];
    await expectEachRefused(db, 'blood_gases', cases, (extra) =>
      s.nurse.post(`/api/patients/${id}/blood-gases`, gas(extra)),
    );
  });

  it('checks the role and the unit on the server', async () => {
    const id = await admit(3);
    expect((await s.anon.post(`/api/patients/${id}/blood-gases`, gas())).status).toBe(401);
    expect((await s.anon.get(`/api/patients/${id}/blood-gases`)).status).toBe(401);
    expect((await s.admin.post(`/api/patients/${id}/blood-gases`, gas())).status).toBe(403);
    expect((await s.outreach.post(`/api/patients/${id}/blood-gases`, gas())).status).toBe(403);
    expect((await s.otherNurse.post(`/api/patients/${id}/blood-gases`, gas())).status).toBe(403);
    expect((await s.otherNurse.get(`/api/patients/${id}/blood-gases`)).status).toBe(403);
    expect(
      (await s.intensivist.post(`/api/patients/${id}/blood-gases`, gas({ sao2: 95, spo2AtSample: 96 }))).status,
    ).toBe(201);
    expect((await s.outreach.get(`/api/patients/${id}/blood-gases`)).status).toBe(200);
  });

  it('corrects and marks in error keeping the original, audited; the task closes when its gas no longer stands', async () => {
    const id = await admit(4);
    const first = (await (await s.nurse.post(`/api/patients/${id}/blood-gases`, gas({ spo2AtSample: 94 }))).json())
      .bloodGas;
    expect(await db('escalations').where({ patient_id: id, kind: 'occult_hypoxaemia', state: 'raised' })).toHaveLength(
      1,
    );
    expect(
      (
        await s.nurse2.post(`/api/blood-gases/${first.id}/correct`, {
          reason: 'Typed the wrong SaO₂',
          gas: gas({ spo2AtSample: 94, sao2: 93 }),
        })
      ).status,
    ).toBe(403);
    expect((await s.nurse.post(`/api/blood-gases/${first.id}/correct`, { reason: 'x', gas: gas() })).status).toBe(400);
    const res = await s.nurse.post(`/api/blood-gases/${first.id}/correct`, {
      reason: 'Typed the wrong SaO₂',
      gas: gas({ spo2AtSample: 94, sao2: 93 }),
    });
    expect(res.status, await res.clone().text()).toBe(201);
    const corrected = (await res.json()).bloodGas;
    expect(corrected.replacesId).toBe(first.id);
    const original = await db('blood_gases').where({ id: first.id }).first();
    expect(original.status).toBe('superseded');
    expect(Number(original.sao2)).toBe(86); // kept as it was
    const closed = await db('escalations').where({ patient_id: id, kind: 'occult_hypoxaemia' }).first();
    expect(closed.state).toBe('closed');
    expect(closed.outcome).toBe('condition_cleared');
    expect((await s.nurse.post(`/api/blood-gases/${first.id}/correct`, { reason: 'Again', gas: gas() })).status).toBe(
      409,
    );

    const err = await s.charge.post(`/api/blood-gases/${corrected.id}/entered-in-error`, { reason: 'Wrong patient' });
    expect(err.status, await err.clone().text()).toBe(200);
    expect((await err.json()).bloodGas.status).toBe('entered_in_error');
    expect(
      await db('audit_log')
        .where({ entity: 'blood_gas', entity_id: String(corrected.id), action: 'blood_gas.entered_in_error' })
        .first(),
    ).toBeDefined();
    const list = await (await s.nurse.get(`/api/patients/${id}/blood-gases`)).json();
    expect(list.bloodGases.map((g: { status: string }) => g.status)).toEqual(['entered_in_error', 'superseded']);
    expect(list.bias).toBeNull();
  });
});

describe('unit gas settings and Scale 2 support', () => {
  it('shows gases in the unit chosen by the admin, and keeps them when a settings PUT leaves them out', async () => {
    const put = await s.admin.put(`/api/units/${unit.code}/settings`, {
      consecutiveCharted: 2,
      deviceDwellMin: 5,
      urgentMarginPoints: 5,
      urgentFloorPct: 85,
      cannotVerifyMin: 15,
      aboveOnOxygenMin: 30,
      renotifyMin: 15,
      overdueMin: 75,
      outreachEmails: ['outreach@fixture.example'],
      gasUnit: 'mmHg',
      barometricMmHg: 700,
    });
    expect(put.status, await put.clone().text()).toBe(200);
    expect((await put.json()).settings).toMatchObject({ gasUnit: 'mmHg', barometricMmHg: 700 });
    expect(
      (
        await s.admin.put(`/api/units/${unit.code}/settings`, {
          consecutiveCharted: 2,
          deviceDwellMin: 5,
          urgentMarginPoints: 5,
          urgentFloorPct: 85,
          cannotVerifyMin: 15,
          aboveOnOxygenMin: 30,
          renotifyMin: 15,
          overdueMin: 75,
          outreachEmails: ['outreach@fixture.example'],
          barometricMmHg: 300,
        })
      ).status,
    ).toBe(400);
    const again = await s.admin.put(`/api/units/${unit.code}/settings`, {
      consecutiveCharted: 2,
      deviceDwellMin: 5,
      urgentMarginPoints: 5,
      urgentFloorPct: 85,
      cannotVerifyMin: 15,
      aboveOnOxygenMin: 30,
      renotifyMin: 15,
      overdueMin: 75,
      outreachEmails: ['outreach@fixture.example'],
    });
    expect((await again.json()).settings).toMatchObject({ gasUnit: 'mmHg', barometricMmHg: 700 });
    const [patient] = await db('bed_stays').where({ bed_id: unit.bedIds[0] }).whereNull('ended_at').pluck('patient_id');
    const list = await (await s.nurse.get(`/api/patients/${patient}/blood-gases`)).json();
    expect(list.gasUnit).toBe('mmHg');
    expect(list.barometricMmHg).toBe(700);
    // The A–a gradient uses the unit's barometric pressure: 0.35 × (700 − 47) − 44.3 / 0.8 − 59.3 = 113.9 (standard alveolar gas equation).
    expect(list.bloodGases.at(-1).derived.aaGradient).toBe(113.9);
  });

  it('says on a Scale 2 order what the latest gas showed, or that none supports it', async () => {
    const id = await admit(5);
    const order = async (basedOnOrderId: number | null) =>
      s.intensivist.post(`/api/patients/${id}/targets`, {
        low: 88,
        high: 92,
        news2Scale: 2,
        reason: 'COPD, retains CO₂',
        basedOnOrderId,
      });
    let res = await order(null);
    expect(res.status, await res.clone().text()).toBe(201);
    let o = (await res.json()).order;
    expect(o.scale2Basis).toMatch(/No blood gas on record supports Scale 2/);
    expect(
      (await s.nurse.post(`/api/patients/${id}/blood-gases`, gas({ paco2: 7.4, ph: 7.31, sao2: 90, spo2AtSample: 90 })))
        .status,
    ).toBe(201);
    res = await order(o.id);
    o = (await res.json()).order;
    expect(o.scale2Basis).toMatch(/^Latest gas: PaCO₂ 7\.4 kPa \(56 mmHg\), pH 7\.31, arterial gas of/);
    const targets = await (await s.nurse.get(`/api/patients/${id}/targets`)).json();
    expect(targets.orders[0].scale2Basis).toBe(o.scale2Basis);
  });
});

describe('demo blood gases (invented)', () => {
  it('hold a pair where the oximeter over-reads, with its bedside task on the board of Level 4', async () => {
    const gases = await db('blood_gases as g')
      .join('patients as p', 'p.id', 'g.patient_id')
      .where('p.mrn', 'like', 'HG%')
      .select('p.mrn', 'g.sao2', 'g.spo2_at_sample', 'g.sample_type');
    expect(gases.length).toBeGreaterThanOrEqual(4);
    expect(gases.some((g) => g.sample_type === 'arterial' && Number(g.sao2) < 88 && g.spo2_at_sample >= 92)).toBe(true);
    const board = await (await s.outreach.get('/api/board?unit=L4ICU')).json();
    const tile = board.tiles.find((t: { bedLabel: string }) => t.bedLabel === '4-04');
    expect(tile.occultHypoxaemia).toMatchObject({ sao2: 86.5, spo2AtSample: 93 });
  });
});
