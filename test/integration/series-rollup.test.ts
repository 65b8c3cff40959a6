/**
 * Issue 11 point 7: the per-minute rollup is written with the raw rows on every path that stores,
 * corrects, marks or withdraws readings; long windows are served from it within the point budget;
 * its band-compliance figures agree with the raw computation within 1 min.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { APP_URL } from '../support/app.ts';
import { createAdmittedPatient, rebuildPatientRollup } from '../support/db.ts';
import { useWard } from '../support/ward.ts';
import { bandCompliance } from '../../src/lib/oxygenation/compliance.ts';
import { floorMinute, minuteRollup } from '../../src/lib/oxygenation/rollup.ts';
import { toBandOrders, toReading } from '../../src/lib/server/charting/readings.ts';
import { minutesBetween } from '../../src/lib/server/queries/rollup.ts';

const { db, unit, s, ids } = useWard({
  beds: 6,
  people: {
    nurse: ['nurse', 'unit'],
    charge: ['charge', 'unit'],
    admin: ['admin', null],
    intensivist: ['intensivist', null],
  },
});
const HOUR = 3_600_000;
const READING_COLUMNS = [
  'taken_at',
  'source',
  'spo2',
  'heart_rate',
  'resp_rate',
  'fio2',
  'fio2_estimated',
  'device',
  'flow_lpm',
  'trace',
  'perfusion_index',
];

async function patientInBed(bedIndex: number, from: number, band: [number, number] | null = [92, 96]) {
  const order = band ? { low: band[0], high: band[1], orderedBy: ids.intensivist, orderedAt: from + 7_500 } : undefined;
  return (await createAdmittedPatient(db, { bedId: unit.bedIds[bedIndex], since: from, band: order })).patientId;
}

async function currentReadings(patientId: number) {
  const rows = await db('observations')
    .where({ patient_id: patientId, status: 'current' })
    .orderBy('taken_at')
    .orderBy('id')
    .select(READING_COLUMNS);
  return rows.map(toReading);
}

/** The stored rollup equals the rollup computed afresh from every current raw row. */
async function expectRollupMatchesRaw(patientId: number) {
  const readings = await currentReadings(patientId);
  const stored = await minutesBetween(patientId, new Date(0), new Date(Date.now() + 48 * HOUR), db);
  if (readings.length === 0) {
    expect(stored.filter((m) => m.trustedN + m.untrustedN > 0 || m.untrustedMs > 0 || m.trustedMs.size > 0)).toEqual(
      [],
    );
    return stored;
  }
  const expected = minuteRollup(readings, floorMinute(readings[0]!.at), floorMinute(readings.at(-1)!.at) + 2 * HOUR);
  expect(stored).toEqual(expected);
  return stored;
}

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();
const obs = (extra: Record<string, unknown> = {}) => ({
  takenAt: minutesAgo(30),
  spo2: 91,
  heartRate: 88,
  respRate: 18,
  device: 'nasal_cannula',
  flowLpm: 2,
  trace: 'clean',
  ...extra,
});

describe('the per-minute rollup follows every writer, in its transaction', () => {
  it('charted obs, a correction and entered in error', async () => {
    const p = await patientInBed(0, Date.now() - 10 * HOUR);
    const created = await s.nurse.post(`/api/patients/${p}/observations`, obs());
    expect(created.status, await created.clone().text()).toBe(201);
    const id = (await created.json()).observation.id;
    let rows = await expectRollupMatchesRaw(p);
    // An hourly obs carries for 75 min (charted maximum gap): 75 or 76 minutes hold its carry.
    expect(rows.reduce((n, m) => n + (m.trustedMs.get(91) ?? 0), 0)).toBe(75 * 60_000);

    const corrected = await s.nurse.post(`/api/observations/${id}/correct`, {
      reason: 'Misread the monitor',
      obs: obs({ spo2: 95, takenAt: minutesAgo(50) }),
    });
    expect(corrected.status, await corrected.clone().text()).toBe(201);
    rows = await expectRollupMatchesRaw(p);
    expect(rows.some((m) => m.trustedMs.has(91))).toBe(false);
    expect(rows.reduce((n, m) => n + m.spo2N, 0)).toBe(1);

    const second = (
      await (await s.nurse.post(`/api/patients/${p}/observations`, obs({ takenAt: minutesAgo(5), spo2: 89 }))).json()
    ).observation.id;
    await expectRollupMatchesRaw(p);
    expect(
      (await s.charge.post(`/api/observations/${second}/entered-in-error`, { reason: 'Wrong patient' })).status,
    ).toBe(200);
    rows = await expectRollupMatchesRaw(p);
    expect(rows.some((m) => m.trustedMs.has(89))).toBe(false);
  });

  it('the device feed', async () => {
    const p = await patientInBed(1, Date.now() - 10 * HOUR);
    const keyRes = await s.admin.post('/api/admin/device-keys', { bedId: unit.bedIds[1], label: 'rollup gateway' });
    const { key } = (await keyRes.json()) as { key: string };
    const end = Date.now() - 120_000;
    const readings = Array.from({ length: 300 }, (_, i) => ({
      at: new Date(end - (299 - i) * 1000).toISOString(),
      spo2: 90 + (i % 5),
      heartRate: 80,
      trace: i % 7 === 0 ? 'noisy' : 'clean',
    }));
    const send = (body: unknown) =>
      fetch(`${APP_URL}/api/ingest`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
        body: JSON.stringify(body),
      });
    expect((await send({ readings: readings.slice(0, 200) })).status).toBe(200);
    await expectRollupMatchesRaw(p);
    // An overlapping resend: only the new seconds are stored, and the minutes they touch recomputed.
    expect((await send({ readings: readings.slice(150) })).status).toBe(200);
    const rows = await expectRollupMatchesRaw(p);
    expect(rows.reduce((n, m) => n + m.trustedN + m.untrustedN, 0)).toBe(300);
  });

  it('trend-file commit and withdrawal', async () => {
    const p = await patientInBed(2, Date.now() - 10 * HOUR);
    const start = Date.now() - 3 * HOUR;
    const lines = ['Time,SpO2,HR'];
    for (let i = 0; i < 90; i++) lines.push(`${new Date(start + i * 60_000).toISOString()},${88 + (i % 6)},77`);
    const q = new URLSearchParams({
      time: 'Time',
      spo2: 'SpO2',
      heartRate: 'HR',
      timeMode: 'iso',
      fileName: 'trend.csv',
    });
    const commit = await s.nurse.request(`/api/patients/${p}/imports/commit?${q}`, {
      method: 'POST',
      headers: { 'content-type': 'text/csv' },
      body: `${lines.join('\n')}\n`,
    });
    expect(commit.status, await commit.clone().text()).toBe(201);
    let rows = await expectRollupMatchesRaw(p);
    expect(rows.reduce((n, m) => n + m.spo2N, 0)).toBe(90);
    const imp = (await commit.json()).import;
    expect((await s.charge.post(`/api/imports/${imp.id}/withdraw`, { reason: 'Neighbouring bed' })).status).toBe(200);
    rows = await expectRollupMatchesRaw(p);
    expect(rows.reduce((n, m) => n + m.spo2N, 0)).toBe(0);
  });
});

describe('long windows from the rollup', () => {
  let p: number;
  beforeAll(async () => {
    const now = Date.now();
    p = await patientInBed(3, now - 30 * HOUR);
    await db('target_orders').insert({
      patient_id: p,
      low: 88,
      high: 92,
      reason: 'second',
      ordered_by: ids.intensivist,
      ordered_at: new Date(now - 9 * HOUR - 23_456),
    });
    // 26 h of readings every 4 s hovering at the lower limit, with noisy spells, a probe-off gap and hourly charted obs.
    const rows = [];
    let seed = 17;
    const rand = () => {
      seed = (seed * 16807) % 2147483647;
      return seed / 2147483647;
    };
    for (let t = now - 26 * HOUR; t < now - 1000; t += 4000) {
      if (t > now - 5 * HOUR && t < now - 4.8 * HOUR) continue;
      const low = t < now - 9 * HOUR ? 92 : 88;
      rows.push({
        patient_id: p,
        taken_at: new Date(t),
        source: 'device',
        spo2: low - 2 + Math.floor(rand() * 5),
        heart_rate: 70 + Math.floor(rand() * 30),
        trace: rand() < 0.06 ? 'noisy' : 'clean',
      });
    }
    for (let t = now - 25.5 * HOUR; t < now; t += HOUR) {
      rows.push({
        patient_id: p,
        taken_at: new Date(t + 1),
        source: 'charted',
        spo2: 93,
        heart_rate: 85,
        fio2: 0.4,
        device: 'simple_mask',
        flow_lpm: 6,
        trace: 'clean',
      });
    }
    rows.sort((a, b) => a.taken_at.getTime() - b.taken_at.getTime());
    for (let i = 0; i < rows.length; i += 5000) await db('observations').insert(rows.slice(i, i + 5000));
    await rebuildPatientRollup(db, p);
  });

  it('answers 12 and 24 h within 1,500 points a line, enveloped, with band-compliance figures within 1 min of the raw computation', async () => {
    const orders = toBandOrders(await db('target_orders').where({ patient_id: p }));
    for (const hours of [12, 24]) {
      const body = await (await s.nurse.get(`/api/patients/${p}/series?hours=${hours}`)).json();
      expect(body.bucketMs).toBeGreaterThan(0);
      expect(body.spo2.length).toBeLessThanOrEqual(1500);
      expect(body.heartRate.length).toBeLessThanOrEqual(1500);
      expect(body.spo2.some((pt: { source: string }) => pt.source === 'charted')).toBe(true);
      // The low edge of the envelope reaches the lowest reading.
      expect(Math.min(...body.spo2.map((pt: { lo?: number; v: number }) => pt.lo ?? pt.v))).toBe(86);
      const readings = (
        await db('observations')
          .where({ patient_id: p, status: 'current' })
          .andWhere('taken_at', '>=', new Date(body.from - 2 * HOUR))
          .orderBy('taken_at')
          .orderBy('id')
          .select(READING_COLUMNS)
      ).map(toReading);
      const raw = bandCompliance(readings, orders, { from: body.from, to: body.to });
      const c = body.derived.compliance;
      for (const k of ['inBandMin', 'belowMin', 'aboveMin', 'untrustedMin', 'noReadingMin', 'noBandMin'] as const) {
        expect(Math.abs(c[k] - raw[k]), `${hours} h ${k}`).toBeLessThanOrEqual(1);
      }
      expect(c.windowMin).toBe(hours * 60);
      expect(c.trustedReadings).toBe(raw.trustedReadings);
      expect(body.rawCounts.spo2).toBe(
        readings.filter((r) => r.at >= body.from && r.at < body.to && r.spo2 !== null).length,
      );
      expect(body.fio2[0]).toMatchObject({ v: 0.4, device: 'simple_mask', flowLpm: 6 });
      // The headline reading is the newest reading itself, with its source — never a minute's mean.
      const newestRow = await db('observations')
        .where({ patient_id: p, status: 'current' })
        .whereNotNull('spo2')
        .orderBy('taken_at', 'desc')
        .orderBy('id', 'desc')
        .first();
      expect(body.newestReading).toMatchObject({
        t: new Date(newestRow.taken_at).getTime(),
        v: newestRow.spo2,
        source: newestRow.source,
      });
      expect(Number.isInteger(body.newestReading.v)).toBe(true);
    }
  });

  it('keeps a 6 h window of one reading a second hovering at the limit within 1,500 points', async () => {
    const now = Date.now();
    const q = await patientInBed(4, now - 7 * HOUR);
    const rows = [];
    for (let t = now - 6 * HOUR; t < now; t += 1000) {
      rows.push({
        patient_id: q,
        taken_at: new Date(t),
        source: 'device',
        spo2: 91 + (Math.floor(t / 1000) % 3),
        heart_rate: 80,
        trace: 'clean',
      });
    }
    for (let i = 0; i < rows.length; i += 5000) await db('observations').insert(rows.slice(i, i + 5000));
    const body = await (await s.nurse.get(`/api/patients/${q}/series?hours=6`)).json();
    expect(body.rawCounts.spo2).toBeGreaterThan(21_000);
    expect(body.spo2.length).toBeLessThanOrEqual(1500);
    expect(Math.min(...body.spo2.map((pt: { lo?: number; v: number }) => pt.lo ?? pt.v))).toBe(91);
  });
});
