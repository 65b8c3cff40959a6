/**
 * Issue 10 point 11: the demo feeder keeps playing (its timer holds the process), reports failures
 * and recovers when the app comes back. Runs the real feeder script for over a minute against a
 * second instance of the built app, which is stopped for a while in the middle.
 * Issue 15: with EBB_FEEDER_VIA=mllp it plays the same readings as HL7 v2 ORU^R01 through an MLLP
 * listener as the demo gateway (registered once), counts the ACKs and reconnects after the listener
 * comes back.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { type HttpSession, signedIn } from '../support/app.ts';
import { createAdmittedPatient, createUnit, createUser, testDb } from '../support/db.ts';
import { startInstance } from '../support/instance.ts';

let db: Knex;
let session: HttpSession;
let unit: { unitId: number; code: string; bedIds: number[] };
let patientId: number;
const port = Number(new URL(process.env.APP_URL!).port) + 3;

/** A patient in the bed with one device reading 30 s ago, so the feeder picks the bed up (it plays only into monitored beds). */
async function monitoredPatient(bedId: number): Promise<number> {
  const { patientId: id } = await createAdmittedPatient(db, { bedId, since: Date.now() - 3_600_000 });
  const { key } = (await (
    await session.post('/api/admin/device-keys', { bedId, label: 'fixture gateway' })
  ).json()) as { key: string };
  const res = await fetch(`${process.env.APP_URL}/api/ingest`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
    body: JSON.stringify({
      readings: [
        { at: new Date(Date.now() - 30_000).toISOString(), spo2: 95, heartRate: 80, perfusionIndex: 2, trace: 'clean' },
      ],
    }),
  });
  expect(res.status).toBe(200);
  return id;
}

beforeAll(async () => {
  db = testDb();
  const admin = await createUser(db, { role: 'admin' });
  session = await signedIn(admin.email, admin.password);
  unit = await createUnit(db, 1);
  patientId = await monitoredPatient(unit.bedIds[0]!);
});
afterAll(async () => {
  await db.destroy();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const deviceTimes = async (id = patientId) =>
  (await db('observations').where({ patient_id: id, source: 'device' }).pluck('taken_at')).map((t: Date) =>
    new Date(t).getTime(),
  );

describe('demo feeder', () => {
  it('plays for over a minute, reports the app going away, and fills the gap when it is back', async () => {
    let app = await startInstance(port, {});
    const feeder = spawn(process.execPath, ['--import', 'tsx', 'docker-free-scripts/feeder.ts'], {
      env: { ...process.env, APP_URL: `http://127.0.0.1:${port}`, EBB_FEEDER_UNITS: unit.code },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    feeder.stdout!.on('data', (d) => {
      output += String(d);
    });
    feeder.stderr!.on('data', (d) => {
      output += String(d);
    });
    const started = Date.now();
    try {
      await sleep(20_000); // the first cycle and one more
      const beforeOutage = await deviceTimes();
      await app.stop();
      const downAt = Date.now();
      await sleep(20_000); // at least one cycle finds the app away
      expect(output).toMatch(/failed/);
      app = await startInstance(port, {});
      await sleep(Math.max(0, started + 70_000 - Date.now())); // over a minute in all
      expect(feeder.exitCode).toBeNull(); // still playing: the timer held the process open
      const after = await deviceTimes();
      expect(after.length).toBeGreaterThan(beforeOutage.length);
      // Readings from the outage were sent once the app answered again, and new ones after a minute.
      expect(after.some((t) => t > downAt + 5_000 && t < downAt + 15_000)).toBe(true);
      expect(Math.max(...after)).toBeGreaterThan(started + 55_000);
      expect(output).toMatch(/recovered after \d+ failing cycle/);
    } finally {
      const exited = new Promise((r) => feeder.once('exit', r));
      feeder.kill('SIGINT');
      await exited;
      await app.stop();
    }
    expect(output).toMatch(/stopped/);
  }, 120_000);
});

/** Starts a process with its output gathered, and waits for lines in it. */
function run(args: string[], env: Record<string, string>) {
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', ...args], {
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const proc = { child, output: '' };
  child.stdout!.on('data', (d) => {
    proc.output += String(d);
  });
  child.stderr!.on('data', (d) => {
    proc.output += String(d);
  });
  return proc;
}
async function waitFor(proc: { output: string }, pattern: RegExp, ms: number): Promise<RegExpMatchArray> {
  const until = Date.now() + ms;
  for (;;) {
    const m = proc.output.match(pattern);
    if (m) return m;
    if (Date.now() > until) throw new Error(`waited ${ms} ms for ${pattern}; output so far:\n${proc.output}`);
    await sleep(100);
  }
}
async function stopProc(proc: { child: ChildProcess }, signal: NodeJS.Signals = 'SIGINT'): Promise<number | null> {
  if (proc.child.exitCode !== null) return proc.child.exitCode;
  const exited = new Promise<number | null>((r) => proc.child.once('exit', (code) => r(code)));
  proc.child.kill(signal);
  return exited;
}

describe('demo feeder over MLLP (EBB_FEEDER_VIA=mllp)', () => {
  const testListenerPort = Number(process.env.EBB_MLLP_PORT);
  // A listener of our own beside the test one, so this test can stop it and start it again.
  const ownListenerPort = testListenerPort + 3;
  const SENDER = { sending_application: 'EBBDEMO', sending_facility: 'HARBOURSIDE' };
  // Nothing listens here: a feeder that fell back to POST /api/ingest would store nothing.
  const deadAppUrl = 'http://127.0.0.1:1';
  const STOPPED = /stopped: (\d+) readings stored in (\d+) cycle\(s\); ACKs AA (\d+), AE (\d+), AR (\d+)/;

  it('refuses an unknown EBB_FEEDER_VIA with a clear error and exit code 1', async () => {
    const feeder = run(['docker-free-scripts/feeder.ts'], {
      EBB_FEEDER_VIA: 'pigeon',
      APP_URL: deadAppUrl,
      EBB_FEEDER_UNITS: 'NO-SUCH-UNIT',
    });
    const code = await new Promise((r) => feeder.child.once('exit', (c) => r(c)));
    expect(code).toBe(1);
    expect(feeder.output).toMatch(/EBB_FEEDER_VIA must be "http" .* or "mllp" .*not "pigeon"/);
  }, 30_000);

  it('plays ORU^R01 as the demo gateway, counts the ACKs, reconnects after the listener is back, and registers the gateway once', async () => {
    const mllpUnit = await createUnit(db, 2);
    const patients = [await monitoredPatient(mllpUnit.bedIds[0]!), await monitoredPatient(mllpUnit.bedIds[1]!)];
    const fixtureAt = Math.max(...(await Promise.all(patients.map((p) => deviceTimes(p)))).flat());
    // Device rows besides the one fixture reading of each patient.
    const newRows = async () =>
      Number(
        (await db('observations').whereIn('patient_id', patients).where('source', 'device').count({ n: '*' }))[0]!.n,
      ) - patients.length;
    const feederEnv = {
      EBB_FEEDER_VIA: 'mllp',
      APP_URL: deadAppUrl,
      EBB_FEEDER_UNITS: mllpUnit.code,
      EBB_FEEDER_CYCLE_MS: '2000',
      EBB_MLLP_HOST: '127.0.0.1',
    };

    let listener = run(['docker-free-scripts/mllp.ts'], { EBB_MLLP_PORT: String(ownListenerPort) });
    await waitFor(listener, /HL7 v2 listener on/, 30_000);
    const first = run(['docker-free-scripts/feeder.ts'], { ...feederEnv, EBB_MLLP_PORT: String(ownListenerPort) });
    let firstCode: number | null;
    try {
      await waitFor(first, /playing readings as HL7 v2 ORU\^R01 over MLLP/, 30_000);
      await waitFor(first, /cycle 1: \d+ readings stored; ACKs AA [1-9]/, 30_000);
      expect(first.output).not.toMatch(/failed/);
      expect(await newRows()).toBeGreaterThan(0);
      // The listener goes away: the feeder reports it, then carries on on a fresh connection.
      expect(await stopProc(listener, 'SIGTERM')).toBe(0);
      await waitFor(first, /beds failed .*no ACK from 127\.0\.0\.1:\d+/, 20_000);
      listener = run(['docker-free-scripts/mllp.ts'], { EBB_MLLP_PORT: String(ownListenerPort) });
      await waitFor(first, /recovered after \d+ failing cycle\(s\); \d+ readings stored; ACKs AA/, 40_000);
    } finally {
      firstCode = await stopProc(first);
      await stopProc(listener, 'SIGTERM');
    }
    expect(firstCode).toBe(0);
    const [, storedText, , aa, ae, ar] = first.output.match(STOPPED) ?? [];
    expect(first.output, 'the stop line with the counts').toMatch(STOPPED);
    expect(Number(aa)).toBeGreaterThanOrEqual(4); // two beds, before and after the outage
    expect([Number(ae), Number(ar)]).toEqual([0, 0]);
    // Every reading the ACKs said were stored is in the database, and nothing else came in.
    const storedFirst = Number(storedText);
    expect(storedFirst).toBeGreaterThan(0);
    expect(await newRows()).toBe(storedFirst);
    // Both beds got readings: each had an AA of its own.
    for (const p of patients) expect(Math.max(...(await deviceTimes(p)))).toBeGreaterThan(fixtureAt);

    // It came as the demo gateway (seen by the listener), not through device keys.
    const gateways = await db('hl7_gateways').where(SENDER).whereNull('revoked_at');
    expect(gateways).toHaveLength(1);
    const gateway = gateways[0]!;
    expect(gateway.last_message_at).not.toBeNull();
    const mappings = await db('hl7_gateway_beds')
      .where({ gateway_id: gateway.id })
      .whereIn('bed_id', mllpUnit.bedIds)
      .orderBy('bed_id');
    expect(mappings.map((m) => m.bed_name)).toEqual([`${mllpUnit.code}^^F-1`, `${mllpUnit.code}^^F-2`]);
    expect(await db('device_keys').whereIn('bed_id', mllpUnit.bedIds).where({ label: 'demo feeder' })).toHaveLength(0);
    const audited = async () =>
      db('audit_log')
        .where({ entity: 'hl7_gateway', entity_id: String(gateway.id) })
        .whereIn('action', ['hl7_gateway.create', 'hl7_gateway.map_bed'])
        .orderBy('id')
        .select('action', 'actor_id', 'after');
    const auditBefore = await audited();
    expect(auditBefore.filter((a) => a.action === 'hl7_gateway.create')).toHaveLength(1);
    expect(auditBefore.every((a) => a.actor_id === null)).toBe(true); // the system, not a person

    // A second start, on the test suite's own listener: the same gateway and mappings, nothing new registered.
    const second = run(['docker-free-scripts/feeder.ts'], { ...feederEnv, EBB_MLLP_PORT: String(testListenerPort) });
    let secondCode: number | null;
    try {
      await waitFor(second, /cycle 1: \d+ readings stored; ACKs AA [1-9]/, 30_000);
    } finally {
      secondCode = await stopProc(second);
    }
    expect(secondCode).toBe(0);
    expect(second.output).not.toMatch(/registered HL7 gateway/);
    expect(await db('hl7_gateways').where(SENDER)).toHaveLength(1);
    expect(
      await db('hl7_gateway_beds').where({ gateway_id: gateway.id }).whereIn('bed_id', mllpUnit.bedIds),
    ).toHaveLength(2);
    expect(await audited()).toEqual(auditBefore);
    const storedSecond = Number(second.output.match(STOPPED)?.[1]);
    expect(await newRows()).toBe(storedFirst + storedSecond);
  }, 150_000);
});
