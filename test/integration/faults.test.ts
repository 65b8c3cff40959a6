/**
 * Faults that say so: MariaDB stopped and started while the board polls (503 in the JSON error
 * shape, a plain page for pages, then recovery without restarting the app), and an app instance
 * killed with SIGKILL during escalation sweeps, then restarted (no duplicate escalation or mail).
 * The SMTP-outage test lives in escalations.test.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import type { Knex } from 'knex';
import type { HttpSession } from '../support/app.ts';
import { createAdmittedPatient, createUnit, testDb, unique } from '../support/db.ts';
import { signInPeople } from '../support/people.ts';
import { startInstance } from '../support/instance.ts';
import { received } from '../support/mailbox.ts';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const DB_DIR = process.env.EBB_TEST_DB_DIR!;

function mariadbPid(): number {
  return Number(readFileSync(`${DB_DIR}/mysqld.pid`, 'utf8').trim());
}
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}
async function stopMariadb(): Promise<void> {
  const pid = mariadbPid();
  process.kill(pid, 'SIGTERM');
  for (let i = 0; i < 300 && alive(pid); i++) await sleep(100);
  if (alive(pid)) throw new Error('MariaDB did not stop');
}
function startMariadb(): void {
  // The same start as test.sh uses (docker-free-scripts/lib.sh), on the same data folder and port.
  const r = spawnSync(
    'bash',
    ['-c', `source docker-free-scripts/lib.sh && start_mariadb "${basename(DB_DIR)}" "${process.env.DB_PORT}"`],
    { stdio: 'inherit', timeout: 60_000 },
  );
  if (r.status !== 0) throw new Error('MariaDB did not start again');
}

let db: Knex;
let unit: { unitId: number; code: string; bedIds: number[] };
let s: Record<string, HttpSession>;
let intensivistId: number;
beforeAll(async () => {
  db = testDb();
  unit = await createUnit(db, 8);
  const people = await signInPeople(db, { charge: ['charge', unit.unitId], int: ['intensivist', null] });
  s = people.sessions;
  intensivistId = people.ids.int;
});
afterAll(async () => {
  await db.destroy();
});

describe('MariaDB stopped and started while the board polls', () => {
  it('answers 503 database_unavailable (and a plain page for pages) while it is down, then recovers by itself', async () => {
    expect((await s.charge.get(`/api/board?unit=${unit.code}`)).status).toBe(200);
    const statuses: number[] = [];
    let polling = true;
    const poller = (async () => {
      while (polling) {
        const res = await s.charge.get(`/api/board?unit=${unit.code}`);
        const body = await res.text();
        statuses.push(res.status);
        if (res.status !== 200) {
          expect(res.status).toBe(503);
          expect(JSON.parse(body).error.code).toBe('database_unavailable');
        }
        await sleep(400);
      }
    })();
    while (!statuses.includes(200)) await sleep(50); // the board answered while MariaDB was up
    await db.destroy(); // the test's own pool must not hold connections across the restart
    try {
      await stopMariadb();
      const until = Date.now() + 30_000;
      while (!statuses.slice(-1).includes(503) && Date.now() < until) await sleep(200);
      expect(statuses).toContain(503);
      const page = await s.charge.get('/board');
      expect(page.status).toBe(503);
      expect(page.headers.get('content-type')).toMatch(/text\/html/);
      expect(await page.text()).toMatch(/database is not answering/i);
      const health = await s.charge.get('/api/health');
      expect(health.status).toBe(503);
    } finally {
      startMariadb();
      db = testDb();
    }
    const until = Date.now() + 40_000;
    while (statuses[statuses.length - 1] !== 200 && Date.now() < until) await sleep(200);
    polling = false;
    await poller;
    expect(statuses[statuses.length - 1], statuses.join(',')).toBe(200);
    // 200 first, 503 while down, 200 again: the app was never restarted.
    expect(statuses.indexOf(503)).toBeGreaterThan(0);
    expect((await s.charge.get('/api/health')).status).toBe(200);
  }, 120_000);
});

describe('an app instance killed with SIGKILL during escalation sweeps', () => {
  it('raises each escalation and sends each mail exactly once after it is restarted', async () => {
    const outreach = `${unique('fault')}@fixture.example`;
    await db('unit_settings').insert({ unit_id: unit.unitId, outreach_emails: outreach });
    const port = Number(new URL(process.env.APP_URL!).port) + 9;
    const env = { EBB_BACKGROUND: 'on', EBB_SWEEP_INTERVAL_MS: '50', EBB_OUTBOX_INTERVAL_MS: '50' };
    let instance = await startInstance(port, env);
    const patients: number[] = [];
    try {
      // Device readings below band for 10 min, written straight to the table: only a sweep raises them.
      for (const bedId of unit.bedIds) {
        const { patientId } = await createAdmittedPatient(db, {
          bedId,
          since: Date.now() - 3 * 3_600_000,
          band: { low: 92, high: 96, orderedBy: intensivistId, orderedAt: Date.now() - 2 * 3_600_000 },
        });
        patients.push(patientId);
      }
      const rows = [];
      for (let i = 0; i < patients.length; i++) {
        for (let m = 10; m >= 0; m--) {
          rows.push({
            patient_id: patients[i],
            bed_id: unit.bedIds[i],
            taken_at: new Date(Date.now() - m * 60_000),
            source: 'device',
            spo2: 84,
            heart_rate: 110,
            trace: 'clean',
          });
        }
      }
      await db('observations').insert(rows);
      // Kill it as soon as its sweeps start raising (or after a moment), mid-work.
      const until = Date.now() + 5_000;
      while (
        Date.now() < until &&
        Number((await db('escalations').whereIn('patient_id', patients).count({ n: '*' }).first())!.n) === 0
      )
        await sleep(20);
      instance.child.kill('SIGKILL');
      await new Promise((r) => instance.child.once('exit', r));
      instance = await startInstance(port, env);

      // Every patient gets one escalation and one mail, whichever instance finishes the work.
      const deadline = Date.now() + 40_000;
      let keys: string[] = [];
      for (;;) {
        const escalations = await db('escalations')
          .whereIn('patient_id', patients)
          .where({ kind: 'below_band' })
          .select('id');
        keys = await db('mail_outbox')
          .whereIn(
            'escalation_id',
            escalations.map((e) => e.id),
          )
          .pluck('idempotency_key');
        const got = (await received()).filter((m) => m.key && keys.includes(m.key));
        if ((escalations.length === patients.length && got.length >= patients.length) || Date.now() > deadline) break;
        await sleep(300);
      }
      await sleep(3_000); // time for any duplicate to arrive
      const perPatient = await db('escalations')
        .whereIn('patient_id', patients)
        .where({ kind: 'below_band' })
        .groupBy('patient_id')
        .select('patient_id')
        .count({ n: '*' });
      expect(perPatient).toHaveLength(patients.length);
      expect(perPatient.every((r) => Number(r.n) === 1)).toBe(true);
      expect(keys).toHaveLength(patients.length);
      const mails = (await received()).filter((m) => m.key && keys.includes(m.key));
      expect(mails).toHaveLength(patients.length);
      expect(new Set(mails.map((m) => m.key)).size).toBe(patients.length);
    } finally {
      await instance.stop();
    }
  }, 120_000);
});
