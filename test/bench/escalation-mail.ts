/**
 * Time from the obs POST that triggers a below-band escalation to its mail arriving in the SMTP
 * fake, 20 runs, median printed (wanted: under 0.5 s — the worker is woken in-process on commit). Runs with the production outbox cadence
 * (EBB_OUTBOX_INTERVAL_MS 2000) unless bench.sh is told otherwise. Figures only.
 *
 * Run through `npm run bench -- escalation-mail`.
 */
import { performance } from 'node:perf_hooks';
import { signedIn } from '../support/app.ts';
import { createUnit, createUser, testDb, unique } from '../support/db.ts';
import { received } from '../support/mailbox.ts';

const RUNS = Number(process.env.BENCH_RUNS ?? 20);
const db = testDb();
const unit = await createUnit(db, RUNS);
await db('unit_settings').insert({ unit_id: unit.unitId, outreach_emails: 'bench-outreach@fixture.example' });
const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
const intensivist = await createUser(db, { role: 'intensivist' });
const session = await signedIn(nurse.email, nurse.password);

const obs = (spo2: number, minsAgo: number) => ({
  takenAt: new Date(Date.now() - minsAgo * 60_000).toISOString(),
  spo2,
  heartRate: 104,
  respRate: 24,
  device: 'simple_mask',
  flowLpm: 6,
  fio2: 0.4,
  trace: 'clean',
  systolic: 116,
  temperature: 37.4,
  consciousness: 'alert',
});

const times: number[] = [];
for (let run = 0; run < RUNS; run++) {
  const [patientId] = await db('patients').insert({
    mrn: unique('ML').slice(0, 20),
    given_name: 'Mail',
    family_name: unique('Bench'),
    date_of_birth: '1952-03-03',
  });
  await db('bed_stays').insert({
    patient_id: patientId,
    bed_id: unit.bedIds[run],
    started_at: new Date(Date.now() - 3 * 3_600_000),
  });
  await db('target_orders').insert({
    patient_id: patientId,
    low: 92,
    high: 96,
    reason: 'bench',
    ordered_by: intensivist.id,
    ordered_at: new Date(Date.now() - 2 * 3_600_000),
  });
  await session.post(`/api/patients/${patientId}/observations`, obs(89, 15));
  const start = performance.now();
  const res = await session.post(`/api/patients/${patientId}/observations`, obs(88, 0)); // the triggering obs
  if (res.status !== 201) throw new Error(`obs POST answered ${res.status}`);
  const esc = await db('escalations').where({ patient_id: patientId, kind: 'below_band' }).first('id');
  if (!esc) throw new Error('no escalation was raised');
  for (;;) {
    if ((await received()).some((m) => m.key === `esc:${esc.id}:raised`)) break;
    if (performance.now() - start > 60_000) throw new Error('mail did not arrive within 60 s');
    await new Promise((r) => setTimeout(r, 25));
  }
  times.push(performance.now() - start);
}
times.sort((a, b) => a - b);
const median = (times[(RUNS - 1) >> 1]! + times[RUNS >> 1]!) / 2;
console.log(
  `obs POST → mail in the SMTP fake, ${RUNS} runs: median ${(median / 1000).toFixed(2)} s · min ${(times[0]! / 1000).toFixed(2)} s · max ${(times[RUNS - 1]! / 1000).toFixed(2)} s (wanted: median ≤ 0.5 s; the worker is woken when the transaction commits; poll backstop every ${process.env.EBB_OUTBOX_INTERVAL_MS ?? 2000} ms)`,
);
await db.destroy();
