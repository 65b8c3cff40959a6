/**
 * Bad input over every write route: each case asserts the status, the field named in
 * `error.fields`, and that no table changed. At least 100 cases (counted below).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { APP_URL, type HttpSession } from '../support/app.ts';
import { createAdmittedPatient, createUnit, testDb } from '../support/db.ts';
import { signInPeople } from '../support/people.ts';

type Who = 'nurse' | 'charge' | 'int' | 'admin' | 'out' | 'device';
interface Case {
  who: Who;
  method: 'POST' | 'PUT';
  path: string;
  body: unknown;
  field: string;
  status?: number;
  label: string;
}

const TABLES = [
  'patients',
  'bed_stays',
  'observations',
  'target_orders',
  'audit_log',
  'device_keys',
  'pleth_checks',
  'observation_imports',
  'unit_settings',
  'bed_assignments',
  'escalations',
];
const iso = (minAgo: number) => new Date(Date.now() - minAgo * 60_000).toISOString();

let db: Knex;
const s = {} as Record<Exclude<Who, 'device'>, HttpSession>;
const fx = {
  patient: 0,
  obs: 0,
  bed: 0,
  freeBed: 0,
  unit: '',
  deviceKey: '',
  keyId: 0,
  escalation: 987654321,
  import: 987654321,
};

beforeAll(async () => {
  db = testDb();
  const a = await createUnit(db, 4);
  const people = await signInPeople(db, {
    nurse: ['nurse', a.unitId],
    charge: ['charge', a.unitId],
    int: ['intensivist', null],
    admin: ['admin', null],
    out: ['outreach', null],
  });
  Object.assign(s, people.sessions);
  const { patientId: patient } = await createAdmittedPatient(db, {
    bedId: a.bedIds[0],
    since: Date.now() - 6 * 3_600_000,
  });
  const [obs] = await db('observations').insert({
    patient_id: patient,
    bed_id: a.bedIds[0],
    taken_at: new Date(Date.now() - 600_000),
    recorded_at: new Date(),
    source: 'charted',
    spo2: 95,
    device: 'room_air',
    fio2: 0.21,
    trace: 'clean',
    recorded_by: people.ids.nurse,
  });
  const made = await s.admin.post('/api/admin/device-keys', { bedId: a.bedIds[0], label: 'bad-input gateway' });
  const { key, deviceKey } = await made.json();
  Object.assign(fx, {
    patient,
    obs,
    bed: a.bedIds[0],
    freeBed: a.bedIds[1],
    unit: a.code,
    deviceKey: key,
    keyId: deviceKey.id,
  });
});
afterAll(async () => {
  await db.destroy();
});

function cases(): Case[] {
  const c: Case[] = [];
  const add = (
    who: Who,
    method: 'POST' | 'PUT',
    path: string,
    label: string,
    list: [unknown, string][],
    status = 400,
  ) => {
    for (const [body, field] of list)
      c.push({ who, method, path, body, field, status, label: `${label} ${JSON.stringify(body).slice(0, 80)}` });
  };
  // POST /api/patients/:id/observations
  const obs = {
    takenAt: iso(5),
    spo2: 94,
    heartRate: 88,
    respRate: 18,
    device: 'nasal_cannula',
    flowLpm: 2,
    fio2: 0.28,
    trace: 'clean',
  };
  const o = (patch: Record<string, unknown>) => ({ ...obs, ...patch });
  add('nurse', 'POST', `/api/patients/{patient}/observations`, 'obs', [
    [o({ spo2: 101 }), 'spo2'],
    [o({ spo2: 19 }), 'spo2'],
    [o({ spo2: 94.5 }), 'spo2'],
    [o({ spo2: '94' }), 'spo2'],
    [o({ spo2: '0x5F' }), 'spo2'],
    [o({ spo2: [94] }), 'spo2'],
    [o({ spo2: true }), 'spo2'],
    [o({ spo2: { v: 94 } }), 'spo2'],
    [o({ spo2: '1e2' }), 'spo2'],
    [o({ spo2: 'NaN' }), 'spo2'],
    [o({ heartRate: 301 }), 'heartRate'],
    [o({ heartRate: 19 }), 'heartRate'],
    [o({ heartRate: '88' }), 'heartRate'],
    [o({ heartRate: 88.5 }), 'heartRate'],
    [o({ respRate: 81 }), 'respRate'],
    [o({ respRate: 1 }), 'respRate'],
    [o({ respRate: '18' }), 'respRate'],
    [o({ fio2: 0.15 }), 'fio2'],
    [o({ fio2: 1.01 }), 'fio2'],
    [o({ fio2: 15 }), 'fio2'],
    [o({ fio2: 101 }), 'fio2'],
    [o({ fio2: '0.28' }), 'fio2'],
    [o({ device: 'jetpack' }), 'device'],
    [o({ device: 1 }), 'device'],
    [o({ device: undefined }), 'device'],
    [o({ flowLpm: 0.1 }), 'flowLpm'],
    [o({ flowLpm: 81 }), 'flowLpm'],
    [o({ flowLpm: '2' }), 'flowLpm'],
    [o({ device: 'room_air', fio2: undefined, flowLpm: 2 }), 'flowLpm'],
    [o({ device: 'high_flow_nasal', flowLpm: undefined, fio2: 0.5 }), 'flowLpm'],
    [o({ device: 'ventilator', flowLpm: undefined, fio2: undefined }), 'fio2'],
    [o({ device: 'room_air', flowLpm: undefined, fio2: 0.5 }), 'fio2'],
    [o({ trace: 'perfect' }), 'trace'],
    [o({ perfusionIndex: 0 }), 'perfusionIndex'],
    [o({ perfusionIndex: 31 }), 'perfusionIndex'],
    [o({ systolic: 39 }), 'systolic'],
    [o({ systolic: 301 }), 'systolic'],
    [o({ temperature: 24 }), 'temperature'],
    [o({ temperature: 46 }), 'temperature'],
    [o({ consciousness: 'sleepy' }), 'consciousness'],
    [o({ note: 'x'.repeat(1001) }), 'note'],
    [o({ probeSite: 'x'.repeat(33) }), 'probeSite'],
    [o({ takenAt: iso(-10) }), 'takenAt'],
    [o({ takenAt: iso(4 * 60 + 5) }), 'takenAt'],
    [o({ takenAt: '2026-11-31T12:00:00Z' }), 'takenAt'],
    [o({ takenAt: '2026-12-02 10:00' }), 'takenAt'],
    [o({ takenAt: 1764669600000 }), 'takenAt'],
    [o({ takenAt: 'yesterday' }), 'takenAt'],
    [o({ spo2: undefined }), 'spo2'],
    [o({ heartrate: 80 }), 'heartrate'],
    [o({ SpO2: 94 }), 'SpO2'],
    [o({ patientId: 1 }), 'patientId'],
  ]);
  // POST /api/observations/:id/correct and entered-in-error
  add('nurse', 'POST', `/api/observations/{obs}/correct`, 'correct', [
    [{ reason: 'Wrong finger', obs: o({ spo2: 120 }) }, 'obs.spo2'],
    [{ reason: 'ok', obs: o({}) }, 'reason'],
    [{ obs: o({}) }, 'reason'],
    [{ reason: 'Wrong finger', obs: o({ extra: 1 }) }, 'obs.extra'],
    [{ reason: 'Wrong finger', obs: o({}), why: 'x' }, 'why'],
    [{ reason: 'Wrong finger', obs: 'x' }, 'obs'],
    [{ reason: 7, obs: o({}) }, 'reason'],
  ]);
  add('nurse', 'POST', `/api/observations/{obs}/entered-in-error`, 'entered-in-error', [
    [{}, 'reason'],
    [{ reason: 'no' }, 'reason'],
    [{ reason: ['x', 'y', 'z'] }, 'reason'],
    [{ reason: 'Wrong patient', also: 1 }, 'also'],
  ]);
  // POST /api/patients (admit)
  const admit = { givenName: 'Ada', familyName: 'Lane', mrn: 'BADIN-1', dateOfBirth: '1960-01-01', bedId: 0 };
  const ad = (patch: Record<string, unknown>) => ({ ...admit, bedId: '{freeBed}', ...patch });
  add('charge', 'POST', '/api/patients', 'admit', [
    [ad({ givenName: '' }), 'givenName'],
    [ad({ familyName: 'x'.repeat(81) }), 'familyName'],
    [ad({ mrn: '!' }), 'mrn'],
    [ad({ mrn: 'x'.repeat(21) }), 'mrn'],
    [ad({ dateOfBirth: '1960-02-30' }), 'dateOfBirth'],
    [ad({ dateOfBirth: '2199-01-01' }), 'dateOfBirth'],
    [ad({ dateOfBirth: '1899-12-31' }), 'dateOfBirth'],
    [ad({ dateOfBirth: '01/01/1960' }), 'dateOfBirth'],
    [ad({ bedId: '1' }), 'bedId'],
    [ad({ bedId: -1 }), 'bedId'],
    [ad({ bedId: 1.5 }), 'bedId'],
    [ad({ co2RetentionRisk: 'yes' }), 'co2RetentionRisk'],
    [ad({ co2RetentionRisk: 1 }), 'co2RetentionRisk'],
    [ad({ nhsNumber: '1' }), 'nhsNumber'],
    [ad({ givenName: 42 }), 'givenName'],
    [ad({ mrn: ['A1'] }), 'mrn'],
  ]);
  add('charge', 'POST', '/api/patients/{patient}/move', 'move', [
    [{}, 'bedId'],
    [{ bedId: '2' }, 'bedId'],
    [{ bedId: 0 }, 'bedId'],
    [{ bedId: 2, to: 3 }, 'to'],
  ]);
  add('charge', 'POST', '/api/patients/{patient}/discharge', 'discharge', [
    [{ note: 'x'.repeat(501) }, 'note'],
    [{ note: 5 }, 'note'],
    [{ reason: 'home' }, 'reason'],
  ]);
  // POST /api/patients/:id/targets
  const t = (patch: Record<string, unknown>) => ({
    low: 92,
    high: 96,
    reason: 'Adjusting',
    news2Scale: 1,
    basedOnOrderId: null,
    ...patch,
  });
  add('int', 'POST', '/api/patients/{patient}/targets', 'target', [
    [t({ low: 79 }), 'low'],
    [t({ high: 101 }), 'high'],
    [t({ low: 95, high: 96 }), 'high'],
    [t({ low: '92' }), 'low'],
    [t({ low: 92.5 }), 'low'],
    [t({ reason: '' }), 'reason'],
    [t({ news2Scale: 3 }), 'news2Scale'],
    [t({ news2Scale: '2' }), 'news2Scale'],
    [t({ news2Scale: 2 }), 'scaleReason'],
    [t({ preset: 'made_up' }), 'preset'],
    [t({ basedOnOrderId: 'x' }), 'basedOnOrderId'],
    [t({ basedOnOrderId: undefined }), 'basedOnOrderId'],
    [t({ urgent: true }), 'urgent'],
  ]);
  // PUT /api/beds/:id/assignment
  add('charge', 'PUT', '/api/beds/{bed}/assignment', 'assignment', [
    [{ nurseId: 'me' }, 'nurseId'],
    [{ nurseId: 0 }, 'nurseId'],
    [{}, 'nurseId'],
    [{ nurseId: null, shift: 'day' }, 'shift'],
  ]);
  // PUT /api/units/:code/settings
  const st = {
    consecutiveCharted: 2,
    deviceDwellMin: 5,
    urgentMarginPoints: 5,
    urgentFloorPct: 85,
    cannotVerifyMin: 15,
    aboveOnOxygenMin: 30,
    renotifyMin: 15,
    overdueMin: 75,
    outreachEmails: ['team@fixture.example'],
  };
  const se = (patch: Record<string, unknown>) => ({ ...st, ...patch });
  add('admin', 'PUT', '/api/units/{unit}/settings', 'settings', [
    [se({ consecutiveCharted: 0 }), 'consecutiveCharted'],
    [se({ deviceDwellMin: 61 }), 'deviceDwellMin'],
    [se({ urgentFloorPct: '85' }), 'urgentFloorPct'],
    [se({ overdueMin: 75.5 }), 'overdueMin'],
    [se({ outreachEmails: [] }), 'outreachEmails'],
    [se({ outreachEmails: ['not-an-address'] }), 'outreachEmails.0'],
    [se({ outreachEmails: 'team@fixture.example' }), 'outreachEmails'],
    [se({ renotifyMin: undefined }), 'renotifyMin'],
    [se({ smsNumbers: [] }), 'smsNumbers'],
  ]);
  // Escalation close (missing id is fine: the body is refused first)
  add('out', 'POST', '/api/escalations/{escalation}/close', 'close', [
    [{}, 'outcome'],
    [{ outcome: 'fixed' }, 'outcome'],
    [{ outcome: 'other', note: 'x'.repeat(1001) }, 'note'],
    [{ outcome: 'other', by: 'me' }, 'by'],
  ]);
  // Admin: device keys
  add('admin', 'POST', '/api/admin/device-keys', 'device key', [
    [{ bedId: '{bed}', label: 'x' }, 'label'],
    [{ bedId: 'one', label: 'Gateway' }, 'bedId'],
    [{ label: 'Gateway' }, 'bedId'],
    [{ bedId: '{bed}', label: 'Gateway', secret: 'x' }, 'secret'],
  ]);
  add('admin', 'POST', '/api/admin/device-keys/{keyId}/revoke', 'revoke', [
    [{}, 'reason'],
    [{ reason: 'no' }, 'reason'],
    [{ reason: 'Lost gateway', now: true }, 'now'],
  ]);
  // Imports withdraw (missing id: body refused first)
  add('nurse', 'POST', '/api/imports/{import}/withdraw', 'withdraw', [
    [{}, 'reason'],
    [{ reason: 'x'.repeat(401) }, 'reason'],
    [{ reason: 'Wrong patient', all: true }, 'all'],
  ]);
  // Pleth attach
  add('nurse', 'POST', '/api/pleth/checks', 'pleth attach', [
    [{ patientId: '{patient}', fileName: 'a.csv', csv: '' }, 'csv'],
    [{ patientId: 'x', fileName: 'a.csv', csv: 'time,red\n' }, 'patientId'],
    [
      { patientId: '{patient}', fileName: 'a.csv', csv: 'time,red,infrared,dark\n0,1,1,1\n', sampleRateHz: '100' },
      'sampleRateHz',
    ],
    [
      { patientId: '{patient}', fileName: 'a.csv', csv: 'time,red,infrared,dark\n0,1,1,1\n', sampleRateHz: 100_000 },
      'sampleRateHz',
    ],
  ]);
  // Device feed (bearer key)
  const r = (patch: Record<string, unknown>) => ({ readings: [{ at: iso(1), spo2: 95, ...patch }] });
  add('device', 'POST', '/api/ingest', 'ingest', [
    [r({ at: '2026-11-31T12:00:00Z' }), 'readings.0.at'],
    [r({ at: '2026-12-02T10:00:00' }), 'readings.0.at'],
    [r({ spo2: '95' }), 'readings.0.spo2'],
    [r({ spo2: 101 }), 'readings.0.spo2'],
    [r({ heartRate: [80] }), 'readings.0.heartRate'],
    [r({ spO2: 95 }), 'readings.0.spO2'],
    [{ readings: [] }, 'readings'],
    [{ readings: 'x' }, 'readings'],
    [{ readings: [{ at: iso(1), spo2: 95 }], bed: 1 }, 'bed'],
  ]);
  return c;
}

describe('bad input over every write route', () => {
  it('has at least 100 cases', () => {
    expect(cases().length).toBeGreaterThanOrEqual(100);
  });

  it('answers each with its status and the field named, and stores nothing', async () => {
    const counts = async () =>
      Object.fromEntries(
        await Promise.all(TABLES.map(async (t) => [t, Number((await db(t).count({ n: '*' }).first())!.n)] as const)),
      );
    const wrong: string[] = [];
    for (const k of cases()) {
      const before = await counts();
      const fill = (v: unknown): unknown =>
        JSON.parse(
          JSON.stringify(v ?? null).replace(/"\{(\w+)\}"/g, (_, name: string) =>
            JSON.stringify((fx as Record<string, unknown>)[name]),
          ),
        );
      const path = k.path.replace(/\{(\w+)\}/g, (_, name: string) => String((fx as Record<string, unknown>)[name]));
      const body = fill(k.body);
      let res: Response;
      if (k.who === 'device') {
        res = await fetch(`${APP_URL}${path}`, {
          method: k.method,
          headers: { authorization: `Bearer ${fx.deviceKey}`, 'content-type': 'application/json' },
          body: JSON.stringify(body),
        });
      } else {
        res = await s[k.who].request(path, { method: k.method, json: body });
      }
      const text = await res.text();
      let fields: Record<string, string> = {};
      try {
        fields = JSON.parse(text).error?.fields ?? {};
      } catch {
        /* not JSON: reported below */
      }
      const after = await counts();
      const problems: string[] = [];
      if (res.status !== k.status) problems.push(`status ${res.status}`);
      if (!(k.field in fields))
        problems.push(`field ${k.field} not named (${Object.keys(fields).join(', ') || text.slice(0, 120)})`);
      const changed = TABLES.filter((t) => after[t] !== before[t]);
      if (changed.length) problems.push(`rows changed in ${changed.join(', ')}`);
      if (problems.length) wrong.push(`${k.label}: ${problems.join('; ')}`);
    }
    expect(wrong).toEqual([]);
  });
});
