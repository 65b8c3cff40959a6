/**
 * HL7 v2 over MLLP against the running listener (started by test-env.sh on EBB_MLLP_PORT), with
 * @medplum/hl7's own client, and the readings read back through the HTTP API.
 */
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Hl7Message } from '@medplum/core';
import { Hl7Client } from '@medplum/hl7';
import { buildOru, hl7Timestamp } from '~/lib/hl7/oru.ts';
import { createAdmittedPatient, unique } from '../support/db.ts';
import { useWard } from '../support/ward.ts';

const MLLP_PORT = Number(process.env.EBB_MLLP_PORT ?? 5599);
const { db, unit, s, ids } = useWard({
  beds: 6,
  people: { admin: ['admin', null], charge: ['charge', 'unit'], intensivist: ['intensivist', null] },
});
let client: Hl7Client;
let seq = 0;

beforeAll(() => {
  client = new Hl7Client({ host: '127.0.0.1', port: MLLP_PORT });
});
afterAll(async () => {
  await client.close();
});

async function patientInBed(bedId: number, from = new Date(Date.now() - 3_600_000)) {
  return (await createAdmittedPatient(db, { bedId, since: from })).patientId;
}

/** A live gateway with its sender names, mapping `bedName` to bed `bedIndex` of the test unit. */
async function gateway(bedIndex: number, bedName = `ICU^^B${bedIndex}`) {
  const app = unique('GW').slice(0, 20);
  const res = await s.admin.post('/api/admin/hl7-gateways', {
    label: `bay ${bedIndex}`,
    sendingApplication: app,
    sendingFacility: 'HARBOUR',
  });
  expect(res.status, await res.clone().text()).toBe(201);
  const { gateway: g } = await res.json();
  const map = await s.admin.post(`/api/admin/hl7-gateways/${g.id}/beds`, { bedName, bedId: unit.bedIds[bedIndex] });
  expect(map.status, await map.clone().text()).toBe(201);
  return { id: g.id as number, app, bedName };
}

const oru = (
  g: { app: string; bedName: string },
  readings: Parameters<typeof buildOru>[0]['readings'],
  facility = 'HARBOUR',
) =>
  buildOru({
    application: g.app,
    facility,
    controlId: `T${Date.now()}${++seq}`,
    bedName: g.bedName,
    sentAt: new Date(),
    readings,
  });

/** Sends and waits for the ACK (any code: the test reads it). */
const send = (msg: Hl7Message | string) =>
  client.sendAndWait(typeof msg === 'string' ? Hl7Message.parse(msg) : msg, { returnAck: 'first', timeoutMs: 10_000 });

function ackOf(ack: Hl7Message) {
  return {
    code: ack.getSegment('MSA')!.getField(1).toString(),
    control: ack.getSegment('MSA')!.getField(2).toString(),
    text: ack.getSegment('MSA')!.getField(3).toString(),
    err: ack.getSegment('ERR'),
  };
}

const deviceRows = (patientId: number) => db('observations').where({ patient_id: patientId, source: 'device' });
const secondsAgo = (n: number) => new Date(Math.floor(Date.now() / 1000) * 1000 - n * 1000);

describe('HL7 gateways (admin)', () => {
  it('only an admin makes, maps, unmaps and revokes gateways; every change is audited', async () => {
    const body = { label: 'bay gateway', sendingApplication: unique('A').slice(0, 20), sendingFacility: 'HARBOUR' };
    expect((await s.anon.post('/api/admin/hl7-gateways', body)).status).toBe(401);
    expect((await s.charge.post('/api/admin/hl7-gateways', body)).status).toBe(403);
    expect((await s.charge.get('/api/admin/hl7-gateways')).status).toBe(403);
    const bad = await s.admin.post('/api/admin/hl7-gateways', { ...body, sendingApplication: 'A|B' });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.fields).toHaveProperty('sendingApplication');
    const made = await s.admin.post('/api/admin/hl7-gateways', body);
    expect(made.status).toBe(201);
    const { gateway: g } = await made.json();
    expect((await s.admin.post('/api/admin/hl7-gateways', body)).status).toBe(409); // one live gateway per sender

    expect(
      (await s.charge.post(`/api/admin/hl7-gateways/${g.id}/beds`, { bedName: 'X^^1', bedId: unit.bedIds[0] })).status,
    ).toBe(403);
    expect(
      (await s.admin.post(`/api/admin/hl7-gateways/${g.id}/beds`, { bedName: 'X^^1', bedId: 999999 })).status,
    ).toBe(400);
    const mapped = await s.admin.post(`/api/admin/hl7-gateways/${g.id}/beds`, {
      bedName: 'X^^1^',
      bedId: unit.bedIds[0],
    });
    expect(mapped.status).toBe(201);
    const mapping = (await mapped.json()).gateway.beds[0];
    expect(mapping.bedName).toBe('X^^1'); // trailing empty parts dropped, as the listener reads PV1-3
    expect(
      (await s.admin.post(`/api/admin/hl7-gateways/${g.id}/beds`, { bedName: 'X^^1', bedId: unit.bedIds[1] })).status,
    ).toBe(409);
    const list = await (await s.admin.get('/api/admin/hl7-gateways')).json();
    expect(list.gateways.find((x: { id: number }) => x.id === g.id).beds).toHaveLength(1);
    expect(list.mllpPort).toBe(MLLP_PORT);
    expect(
      (await s.charge.request(`/api/admin/hl7-gateways/${g.id}/beds/${mapping.id}`, { method: 'DELETE' })).status,
    ).toBe(403);
    const unmapped = await s.admin.request(`/api/admin/hl7-gateways/${g.id}/beds/${mapping.id}`, { method: 'DELETE' });
    expect(unmapped.status).toBe(200);
    expect((await unmapped.json()).gateway.beds).toEqual([]);

    expect((await s.admin.post(`/api/admin/hl7-gateways/${g.id}/revoke`, { reason: '' })).status).toBe(400);
    expect((await s.admin.post(`/api/admin/hl7-gateways/${g.id}/revoke`, { reason: 'replaced' })).status).toBe(200);
    expect((await s.admin.post(`/api/admin/hl7-gateways/${g.id}/revoke`, { reason: 'again' })).status).toBe(409);
    expect((await s.admin.post('/api/admin/hl7-gateways', body)).status).toBe(201); // the sender name is free again
    const audit = await db('audit_log')
      .where({ entity: 'hl7_gateway', entity_id: String(g.id) })
      .orderBy('id');
    expect(audit.map((a) => [a.action, a.actor_id])).toEqual([
      ['hl7_gateway.create', ids.admin],
      ['hl7_gateway.map_bed', ids.admin],
      ['hl7_gateway.unmap_bed', ids.admin],
      ['hl7_gateway.revoke', ids.admin],
    ]);
  });
});

describe('ORU^R01 over MLLP', () => {
  it('round trip: AA, the readings read back through the API, a resend stores nothing twice', async () => {
    const g = await gateway(0);
    const patientId = await patientInBed(unit.bedIds[0]!);
    const t0 = secondsAgo(30);
    const readings = [0, 5, 10].map((d, i) => ({
      at: new Date(t0.getTime() + d * 1000),
      spo2: 93 + i,
      heartRate: 90 + i,
      perfusionIndex: 1.5,
    }));
    const msg = oru(g, readings);
    const ack = ackOf(await send(msg));
    expect(ack.code).toBe('AA');
    expect(ack.control).toBe(msg.header.getField(10).toString());
    expect(ack.text).toMatch(/^3 stored/);
    expect(ack.err).toBeUndefined();

    const res = await s.charge.get(`/api/patients/${patientId}/observations?include=all&pageSize=10`);
    expect(res.status).toBe(200);
    const items = (await res.json()).items as { takenAt: string; spo2: number; heartRate: number; source: string }[];
    expect(items.map((o) => [o.takenAt, o.spo2, o.heartRate, o.source])).toEqual(
      readings.reverse().map((r) => [r.at.toISOString(), r.spo2, r.heartRate, 'device']),
    );

    const again = ackOf(await send(msg));
    expect(again.code).toBe('AA');
    expect(again.text).toMatch(/0 stored; 3 already stored/);
    expect(await deviceRows(patientId)).toHaveLength(3);
    expect((await db('hl7_gateways').where({ id: g.id }).first()).last_message_at).not.toBeNull();
  });

  it('the same readings through POST /api/ingest and through HL7 are one set (idempotency by bed and time across both paths)', async () => {
    const g = await gateway(1);
    const patientId = await patientInBed(unit.bedIds[1]!);
    const at = secondsAgo(20);
    const keyRes = await s.admin.post('/api/admin/device-keys', { bedId: unit.bedIds[1], label: 'json gateway' });
    const { key } = await keyRes.json();
    const json = await fetch(`${process.env.APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
      body: JSON.stringify({ readings: [{ at: at.toISOString(), spo2: 96 }] }),
    });
    expect((await json.json()).stored).toBe(1);
    expect(ackOf(await send(oru(g, [{ at, spo2: 96 }]))).text).toMatch(/0 stored; 1 already stored/);
    expect(await deviceRows(patientId)).toHaveLength(1);
  });

  it('runs the escalation checks in the same path: device readings below band for the dwell raise an escalation', async () => {
    const g = await gateway(2);
    const patientId = await patientInBed(unit.bedIds[2]!, new Date(Date.now() - 3 * 3_600_000));
    const intensivist = await db('users').where({ role: 'intensivist' }).first();
    await db('target_orders').insert({
      patient_id: patientId,
      low: 92,
      high: 96,
      reason: 'fixture',
      ordered_by: intensivist.id,
      ordered_at: new Date(Date.now() - 2 * 3_600_000),
    });
    // Seven minutes of one-a-minute readings at 89 % (band 92–96; dwell default 5 min; 3 points below: standard).
    const readings = Array.from({ length: 8 }, (_, i) => ({ at: secondsAgo(420 - i * 60), spo2: 89, heartRate: 110 }));
    expect(ackOf(await send(oru(g, readings))).code).toBe('AA');
    const esc = await db('escalations').where({ patient_id: patientId, kind: 'below_band' });
    expect(esc.map((e) => [e.state, e.severity])).toEqual([['raised', 'standard']]);
  });

  describe('refusals store nothing and answer AE or AR with the reason in MSA-3 and an ERR segment', () => {
    let g: { id: number; app: string; bedName: string };
    let patientId: number;
    beforeAll(async () => {
      g = await gateway(3);
      patientId = await patientInBed(unit.bedIds[3]!);
    });

    async function refused(msg: Hl7Message | string, code: 'AE' | 'AR', text: RegExp, errCode: string) {
      const ack = ackOf(await send(msg));
      expect(ack.code).toBe(code);
      expect(ack.text).toMatch(text);
      expect(ack.err).toBeDefined();
      expect(ack.err!.getComponent(3, 1)).toBe(errCode);
      expect(ack.err!.getField(4).toString()).toBe('E');
      expect(await deviceRows(patientId)).toHaveLength(0);
    }

    it('a malformed segment', async () => {
      const msg = oru(g, [{ at: secondsAgo(5), spo2: 95 }])
        .toString()
        .replace('\rPV1|', '\rPV1|1\rOB@X|');
      await refused(msg, 'AE', /Malformed segment/, '100');
    });
    it('a non-numeric value', async () => {
      await refused(
        oru(g, [{ at: secondsAgo(5), spo2: 95 }])
          .toString()
          .replace('|95|', '|9S|'),
        'AE',
        /OBX 1.*not a number/,
        '102',
      );
    });
    it('an unknown bed', async () => {
      await refused(
        oru({ ...g, bedName: 'ICU^^B99' }, [{ at: secondsAgo(5), spo2: 95 }]),
        'AE',
        /Bed ICU\^\^B99|Bed ICU\\S\\\\S\\B99/,
        '103',
      );
    });
    it("a value out of range (the feed's own limits and words)", async () => {
      await refused(
        oru(g, [
          { at: secondsAgo(6), spo2: 95 },
          { at: secondsAgo(5), spo2: 101 },
        ]),
        'AE',
        /OBX 2: SpO₂ over 100 % is not plausible/,
        '102',
      );
    });
    it('a time in the future', async () => {
      await refused(oru(g, [{ at: new Date(Date.now() + 3_600_000), spo2: 95 }]), 'AE', /in the future/, '102');
    });
    it('an impossible date', async () => {
      const msg = oru(g, [{ at: secondsAgo(5), spo2: 95 }])
        .toString()
        .replace(/(OBX\|1\|[^\r]*\|)\d{8}/, '$120261131');
      await refused(msg, 'AE', /not a real date/, '102');
    });
    it('a message type it does not handle', async () => {
      const msg = oru(g, [{ at: secondsAgo(5), spo2: 95 }])
        .toString()
        .replace('ORU^R01^ORU_R01', 'ADT^A01^ADT_A01');
      await refused(msg, 'AR', /ADT\S*A01 is not handled/, '200');
    });
    it('an unknown sender', async () => {
      await refused(
        oru({ ...g, app: 'STRANGER' }, [{ at: secondsAgo(5), spo2: 95 }]),
        'AR',
        /not a live gateway/,
        '204',
      );
    });
    it('a revoked gateway', async () => {
      const other = await gateway(4);
      const pid = await patientInBed(unit.bedIds[4]!);
      expect((await s.admin.post(`/api/admin/hl7-gateways/${other.id}/revoke`, { reason: 'retired' })).status).toBe(
        200,
      );
      const ack = ackOf(await send(oru(other, [{ at: secondsAgo(5), spo2: 95 }])));
      expect(ack.code).toBe('AR');
      expect(await deviceRows(pid)).toHaveLength(0);
    });
    it('a framed block that is not an HL7 message at all', async () => {
      const reply = await new Promise<string>((resolve, reject) => {
        const sock = net.connect(MLLP_PORT, '127.0.0.1', () =>
          sock.write(
            Buffer.concat([Buffer.from([0x0b]), Buffer.from('HELLO|this is not hl7'), Buffer.from([0x1c, 0x0d])]),
          ),
        );
        let buf = '';
        sock.on('data', (d) => {
          buf += d.toString('utf8');
          if (buf.includes('\x1c\r')) {
            sock.end();
            resolve(buf);
          }
        });
        sock.on('error', reject);
        setTimeout(() => {
          sock.destroy();
          reject(new Error('no ACK'));
        }, 10_000);
      });
      // The MLLP frame bytes (VT, then FS CR) around the ACK.
      const ack = Hl7Message.parse(
        reply.replace(String.fromCharCode(0x0b), '').replace(`${String.fromCharCode(0x1c)}\r`, ''),
      );
      expect(ack.getSegment('MSA')!.getField(1).toString()).toBe('AR');
      expect(ack.getSegment('MSA')!.getField(3).toString()).toMatch(/Not an HL7 v2 message/);
      expect(ack.getSegment('ERR')).toBeDefined();
    });
    it('nothing at all stored after every refusal (and a good message still goes in)', async () => {
      expect(await deviceRows(patientId)).toHaveLength(0);
      expect(ackOf(await send(oru(g, [{ at: secondsAgo(3), spo2: 95 }]))).code).toBe('AA');
      expect(await deviceRows(patientId)).toHaveLength(1);
    });
  });

  it('hl7Timestamp writes UTC with milliseconds and +0000', () => {
    expect(hl7Timestamp(new Date('2026-12-02T10:15:00.123Z'))).toBe('20261202101500.123+0000');
  });
});
