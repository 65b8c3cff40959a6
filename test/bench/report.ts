/**
 * Unit report and handover sheet at size. Seeds one unit of 30 beds with 90 days of one-per-minute
 * device readings per bed (3.9 million rows, written by MariaDB itself from its sequence engine so
 * seeding takes seconds, not minutes) and hourly charted obs, then times, through HTTP as a signed-in
 * intensivist: the 90-day unit report (BENCH_REPORT_RUNS, default 5) and the handover sheet
 * (BENCH_HANDOVER_RUNS, default 20). Prints p50 / min / max. Figures only: nothing asserted.
 *
 * Run through `npm run bench -- report` (it starts the private services).
 */
import { performance } from 'node:perf_hooks';
import { signedIn } from '../support/app.ts';
import { createUser, testDb, unique } from '../support/db.ts';
import { formatCount } from '../../src/lib/time/format.ts';

const BEDS = 30;
const DAYS = 90;
const REPORT_RUNS = Number(process.env.BENCH_REPORT_RUNS ?? 5);
const HANDOVER_RUNS = Number(process.env.BENCH_HANDOVER_RUNS ?? 20);
const db = testDb();
const MINUTES = DAYS * 24 * 60 + 24 * 60; // a day more than the report, so the first day has readings before it

const t0 = performance.now();
const intensivist = await createUser(db, { role: 'intensivist' });
const code = unique('R').slice(0, 16);
const [unitId] = await db('units').insert({
  code,
  name: 'Report bench unit',
  hospital: 'Bench Hospital',
  time_zone: 'Europe/London',
});
const nowMinute = Math.floor(Date.now() / 60_000) * 60_000;
const start = new Date(nowMinute - MINUTES * 60_000);
for (let b = 0; b < BEDS; b++) {
  const [bedId] = await db('beds').insert({ unit_id: unitId, label: `R-${b + 1}`, position: b });
  const [patientId] = await db('patients').insert({
    mrn: unique('RB').slice(0, 20),
    given_name: 'Bench',
    family_name: `Report ${b}`,
    date_of_birth: '1960-01-01',
  });
  await db('bed_stays').insert({ patient_id: patientId, bed_id: bedId, started_at: start });
  await db('target_orders').insert({
    patient_id: patientId,
    low: 92,
    high: 96,
    reason: 'bench',
    ordered_by: intensivist.id,
    ordered_at: start,
  });
  // Per minute: mostly in band, a 40-minute dip each day on every 5th bed, an untrusted minute every 97.
  await db.raw(
    `INSERT INTO observations (patient_id, bed_id, taken_at, source, spo2, heart_rate, trace, recorded_at)
    SELECT ?, ?, ? + INTERVAL seq MINUTE, 'device', IF(? AND seq % 1440 BETWEEN 600 AND 639, 88, 93 + (seq * 7 + ?) % 4), 80 + seq % 9,
      IF(seq % 97 = 0, 'noisy', 'clean'), ? + INTERVAL seq MINUTE
    FROM seq_0_to_${MINUTES - 1}`,
    [patientId, bedId, start, b % 5 === 0 ? 1 : 0, b, start],
  );
  await db.raw(
    `INSERT INTO observations (patient_id, bed_id, taken_at, source, spo2, heart_rate, resp_rate, fio2, device, flow_lpm, trace, systolic, temperature, consciousness, recorded_at)
    SELECT ?, ?, ? + INTERVAL seq HOUR + INTERVAL 7 MINUTE + INTERVAL 1 SECOND, 'charted', 94, 82, 18, 0.28, 'nasal_cannula', 2, 'clean', 121, 37.0, 'alert', ? + INTERVAL seq HOUR
    FROM seq_0_to_${MINUTES / 60 - 1}`,
    [patientId, bedId, start, start],
  );
}
const [{ n }] = await db('observations')
  .join('patients', 'patients.id', 'observations.patient_id')
  .where('patients.family_name', 'like', 'Report %')
  .count({ n: '*' });
console.log(
  `seeded 1 unit × ${BEDS} beds × ${DAYS + 1} days: ${formatCount(Number(n))} readings in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
);
await db.raw('ANALYZE TABLE observations');

const session = await signedIn(intensivist.email, intensivist.password);

async function time(path: string, runs: number) {
  const times: number[] = [];
  let bytes = 0;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    const res = await session.get(path);
    const body = await res.text();
    times.push(performance.now() - t);
    if (res.status !== 200) throw new Error(`${path} → ${res.status}: ${body.slice(0, 300)}`);
    bytes = body.length;
  }
  times.sort((a, b) => a - b);
  const p50 = times[Math.floor((times.length - 1) / 2)]!;
  return `p50 ${Math.round(p50)} ms · min ${Math.round(times[0]!)} ms · max ${Math.round(times[times.length - 1]!)} ms · ${runs} runs · ${formatCount(bytes)} bytes`;
}

console.log(`GET /api/reports/units/${code}?days=90  ${await time(`/api/reports/units/${code}?days=90`, REPORT_RUNS)}`);
console.log(`GET /api/reports/units/${code}?days=7   ${await time(`/api/reports/units/${code}?days=7`, REPORT_RUNS)}`);
console.log(`GET /api/handover?unit=${code}          ${await time(`/api/handover?unit=${code}`, HANDOVER_RUNS)}`);
console.log(
  'raw readings, no rollup: every figure from bandCompliance over the current rows (see README "Benchmarks")',
);
await db.destroy();
