import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { APP_URL } from '../support/app.ts';
import { countRows, createAdmittedPatient } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const { db, unit, s, ids } = useWard({ beds: 6, people: { admin: ['admin', null], charge: ['charge', 'unit'] } });

/** A patient in a bed from `from` (and until `to`), written straight to the fixtures. */
async function patientInBed(bedId: number, from: Date, to: Date | null = null) {
  return (await createAdmittedPatient(db, { bedId, since: from, until: to })).patientId;
}

async function newKey(bedIndex: number) {
  const res = await s.admin.post('/api/admin/device-keys', {
    bedId: unit.bedIds[bedIndex],
    label: `gateway ${bedIndex}`,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()) as { key: string; deviceKey: { id: number; prefix: string } };
}

function send(key: string | null, body: unknown, extra: Record<string, string> = {}) {
  return fetch(`${APP_URL}/api/ingest`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...(key ? { authorization: `Bearer ${key}` } : {}), ...extra },
    body: JSON.stringify(body),
  });
}

/** n readings one second apart ending `endAgoMs` before now. */
function readings(n: number, endAgoMs: number, spo2 = 95) {
  const end = Date.now() - endAgoMs;
  return Array.from({ length: n }, (_, i) => ({
    at: new Date(end - (n - 1 - i) * 1000).toISOString(),
    spo2,
    heartRate: 82,
    perfusionIndex: 2.1,
    trace: 'clean',
  }));
}

const deviceRows = (patientId: number) => db('observations').where({ patient_id: patientId, source: 'device' });

describe('device keys (admin)', () => {
  it('only an admin creates, lists and revokes keys; the key is shown once and only its hash is stored', async () => {
    const body = { bedId: unit.bedIds[0], label: 'bay gateway' };
    expect((await s.anon.post('/api/admin/device-keys', body)).status).toBe(401);
    expect((await s.charge.post('/api/admin/device-keys', body)).status).toBe(403);
    expect((await s.charge.get('/api/admin/device-keys')).status).toBe(403);
    expect((await s.admin.post('/api/admin/device-keys', { bedId: 999999, label: 'x' })).status).toBe(400);

    const { key, deviceKey } = await newKey(0);
    expect(key).toMatch(/^ebw_[A-Za-z0-9_-]{43}$/);
    const row = await db('device_keys').where({ id: deviceKey.id }).first();
    expect(row.key_hash).toBe(createHash('sha256').update(key).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(key.slice(10));
    const list = await (await s.admin.get('/api/admin/device-keys')).json();
    expect(JSON.stringify(list)).not.toContain(key.slice(10));
    expect(list.keys.find((k: { id: number }) => k.id === deviceKey.id).prefix).toBe(key.slice(0, 10));

    expect((await s.charge.post(`/api/admin/device-keys/${deviceKey.id}/revoke`, { reason: 'moved' })).status).toBe(
      403,
    );
    expect((await s.admin.post(`/api/admin/device-keys/${deviceKey.id}/revoke`, { reason: '' })).status).toBe(400);
    expect(
      (await s.admin.post(`/api/admin/device-keys/${deviceKey.id}/revoke`, { reason: 'gateway replaced' })).status,
    ).toBe(200);
    expect((await s.admin.post(`/api/admin/device-keys/${deviceKey.id}/revoke`, { reason: 'again' })).status).toBe(409);
    const audit = await db('audit_log')
      .where({ entity: 'device_key', entity_id: String(deviceKey.id) })
      .orderBy('id');
    expect(audit.map((a) => [a.action, a.actor_id])).toEqual([
      ['device_key.create', ids.admin],
      ['device_key.revoke', ids.admin],
    ]);
    expect(JSON.stringify(audit)).not.toContain(key.slice(10));
  });
});

describe('POST /api/ingest', () => {
  let patientId: number;
  let key: string;
  beforeAll(async () => {
    patientId = await patientInBed(unit.bedIds[1], new Date(Date.now() - 6 * 3_600_000));
    key = (await newKey(1)).key;
  });

  it("stores readings for the patient in the key's bed with the right key", async () => {
    const res = await send(key, { readings: readings(10, 3_600_000) });
    expect(res.status, await res.clone().text()).toBe(200);
    expect(await res.json()).toMatchObject({ received: 10, stored: 10, duplicates: 0, withoutPatient: 0 });
    const rows = await deviceRows(patientId);
    expect(rows).toHaveLength(10);
    expect(
      rows.every(
        (r) =>
          r.bed_id === unit.bedIds[1] &&
          r.spo2 === 95 &&
          r.trace === 'clean' &&
          Number(r.perfusion_index) === 2.1 &&
          r.status === 'current',
      ),
    ).toBe(true);
  });

  it('refuses a wrong key, a missing key and a malformed header, storing nothing', async () => {
    const before = await countRows(db, 'observations');
    for (const [k, code] of [
      [`${key}x`, 'invalid_device_key'],
      [`ebw_${'A'.repeat(43)}`, 'invalid_device_key'],
      [null, 'device_key_required'],
    ] as const) {
      const res = await send(k, { readings: readings(3, 3_500_000) });
      expect(res.status).toBe(401);
      expect((await res.json()).error.code).toBe(code);
    }
    const basic = await send(null, { readings: readings(3, 3_500_000) }, { authorization: `Basic ${key}` });
    expect(basic.status).toBe(401);
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('refuses a revoked key', async () => {
    const { key: k2, deviceKey } = await newKey(1);
    expect((await send(k2, { readings: readings(2, 3_400_000) })).status).toBe(200);
    await s.admin.post(`/api/admin/device-keys/${deviceKey.id}/revoke`, { reason: 'decommissioned' });
    const before = await countRows(db, 'observations');
    const res = await send(k2, { readings: readings(2, 3_300_000) });
    expect(res.status).toBe(401);
    expect((await res.json()).error.code).toBe('device_key_revoked');
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('ignores readings already stored for the bed, so a gateway can resend a batch', async () => {
    const batch = readings(20, 3_000_000);
    expect(await (await send(key, { readings: batch })).json()).toMatchObject({ stored: 20, duplicates: 0 });
    const again = await (await send(key, { readings: batch })).json();
    expect(again).toMatchObject({ received: 20, stored: 0, duplicates: 20 });
    expect(again.message).toMatch(/20 already stored/);
    // Half old, half new; and one time twice inside the batch.
    // (One call: two calls of readings() a millisecond apart would give two different times.)
    const fresh = readings(10, 2_900_000);
    const mixed = [...batch.slice(10), ...fresh, fresh[0]];
    expect(await (await send(key, { readings: mixed })).json()).toMatchObject({
      received: 21,
      stored: 10,
      duplicates: 11,
    });
    const times = (await deviceRows(patientId).select('taken_at')).map((r) => new Date(r.taken_at).getTime());
    expect(new Set(times).size).toBe(times.length);
  });

  it('stores nothing from a batch with one bad reading, and names it by index and field', async () => {
    const before = await countRows(db, 'observations');
    const batch: Record<string, unknown>[] = readings(30, 2_500_000);
    batch[12] = { ...batch[12], spo2: 140 };
    const res = await send(key, { readings: batch });
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(error.code).toBe('invalid_input');
    expect(Object.keys(error.fields)).toEqual(['readings.12.spo2']);
    expect(error.fields['readings.12.spo2']).toMatch(/over 100/);
    const other = readings(5, 2_400_000) as Record<string, unknown>[];
    other[3] = { ...other[3], at: 'yesterday' };
    other[4] = { ...other[4], trace: 'sparkly' };
    const res2 = await send(key, { readings: other });
    expect(Object.keys((await res2.json()).error.fields).sort()).toEqual(['readings.3.at', 'readings.4.trace']);
    expect((await send(key, { readings: [] })).status).toBe(400);
    expect((await send(key, { nothing: true })).status).toBe(400);
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('takes 3,600 readings in one request, and refuses 3,601', async () => {
    const batch = readings(3600, 2 * 3_600_000 + 60_000, 93);
    const res = await send(key, { readings: batch });
    expect(res.status, await res.clone().text()).toBe(200);
    expect(await res.json()).toMatchObject({ received: 3600, stored: 3600 });
    const n = await deviceRows(patientId).andWhere('spo2', 93).count({ n: '*' }).first();
    expect(Number(n!.n)).toBe(3600);
    const tooMany = await send(key, { readings: readings(3601, 5 * 3_600_000) });
    expect(tooMany.status).toBe(400);
    expect(Object.keys((await tooMany.json()).error.fields)).toEqual(['readings']);
  });
});

describe("readings follow the patient in the bed at each reading's time", () => {
  it('says so when the bed is empty and stores nothing', async () => {
    const { key } = await newKey(2);
    const before = await countRows(db, 'observations');
    const res = await send(key, { readings: readings(5, 60_000) });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ received: 5, stored: 0, withoutPatient: 5, bed: 'F-3' });
    expect(body.message).toMatch(/bed F-3 had no patient at those times/);
    expect(await countRows(db, 'observations')).toBe(before);
  });

  it('splits a batch across a discharge and the next admission, and leaves the empty minutes out', async () => {
    const bed = unit.bedIds[3];
    const t0 = Date.now() - 2 * 3_600_000;
    const first = await patientInBed(bed, new Date(t0 - 3_600_000), new Date(t0 + 10 * 60_000));
    const second = await patientInBed(bed, new Date(t0 + 15 * 60_000));
    const { key } = await newKey(3);
    // One reading a minute for 30 minutes from t0: 10 to the first patient, 5 to nobody, 15 to the second.
    const batch = Array.from({ length: 30 }, (_, i) => ({
      at: new Date(t0 + i * 60_000).toISOString(),
      spo2: 96,
      heartRate: 70,
    }));
    const body = await (await send(key, { readings: batch })).json();
    expect(body).toMatchObject({ received: 30, stored: 25, withoutPatient: 5 });
    expect(body.message).toMatch(/some of those times/);
    expect(await deviceRows(first)).toHaveLength(10);
    expect(await deviceRows(second)).toHaveLength(15);
  });

  it('refuses a foreign Origin even with a good key (the middleware guards every JSON write)', async () => {
    const { key } = await newKey(4);
    const res = await send(key, { readings: readings(1, 60_000) }, { origin: 'https://elsewhere.example' });
    expect(res.status).toBe(403);
  });
});
