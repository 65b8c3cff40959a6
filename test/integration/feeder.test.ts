/**
 * Issue 10 point 11: the demo feeder keeps playing (its timer holds the process), reports failures
 * and recovers when the app comes back. Runs the real feeder script for over a minute against a
 * second instance of the built app, which is stopped for a while in the middle.
 */
import { spawn } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { signedIn } from '../support/app.ts';
import { createAdmittedPatient, createUnit, createUser, testDb } from '../support/db.ts';
import { startInstance } from '../support/instance.ts';

let db: Knex;
let unit: { unitId: number; code: string; bedIds: number[] };
let patientId: number;
const port = Number(new URL(process.env.APP_URL!).port) + 3;

beforeAll(async () => {
  db = testDb();
  unit = await createUnit(db, 1);
  ({ patientId } = await createAdmittedPatient(db, { bedId: unit.bedIds[0], since: Date.now() - 3_600_000 }));
  // One device reading, so the feeder picks the bed up (it plays only into monitored beds).
  const admin = await createUser(db, { role: 'admin' });
  const session = await signedIn(admin.email, admin.password);
  const { key } = (await (await session.post('/api/admin/device-keys', { bedId: unit.bedIds[0], label: 'fixture gateway' })).json()) as { key: string };
  const res = await fetch(`${process.env.APP_URL}/api/ingest`, {
    method: 'POST', headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
    body: JSON.stringify({ readings: [{ at: new Date(Date.now() - 30_000).toISOString(), spo2: 95, heartRate: 80, perfusionIndex: 2, trace: 'clean' }] }),
  });
  expect(res.status).toBe(200);
});
afterAll(async () => { await db.destroy(); });

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const deviceTimes = async () => (await db('observations').where({ patient_id: patientId, source: 'device' }).pluck('taken_at')).map((t: Date) => new Date(t).getTime());

describe('demo feeder', () => {
  it('plays for over a minute, reports the app going away, and fills the gap when it is back', async () => {
    let app = await startInstance(port, {});
    const feeder = spawn(process.execPath, ['--import', 'tsx', 'docker-free-scripts/feeder.ts'], {
      env: { ...process.env, APP_URL: `http://127.0.0.1:${port}`, EBB_FEEDER_UNITS: unit.code },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    feeder.stdout!.on('data', (d) => { output += String(d); });
    feeder.stderr!.on('data', (d) => { output += String(d); });
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
