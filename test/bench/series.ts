/**
 * GET /api/patients/:id/series at 6 / 12 / 24 / 72 h for a patient with 72 h of one-per-second
 * device readings (259,200) hovering around the lower limit of the band, among 30 patients with
 * hourly charted obs: p50 and p95 of the answer time, bytes and points per line; beside it, the
 * floor being avoided: reading that patient's 72 h of raw rows from this script.
 *
 * Run with `npm run bench -- series` (the test services on ports of their own). It adds its own
 * invented fixture unit, staff and patients, and prints figures; it asserts nothing.
 */
import { performance } from 'node:perf_hooks';
import { signedIn } from '../support/app.ts';
import { createUnit, createUser, rebuildPatientRollup, testDb, unique } from '../support/db.ts';

const HOUR = 3_600_000;
const PATIENTS = 30;
const REQUESTS = 20;
const db = testDb();

const pad = (s: string | number, w: number) => String(s).padStart(w);
const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!;
};

try {
  const unit = await createUnit(db, PATIENTS);
  const intensivist = await createUser(db, { role: 'intensivist' });
  const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
  const now = Date.now();
  const patients: number[] = [];
  for (let i = 0; i < PATIENTS; i++) {
    const [id] = await db('patients').insert({
      mrn: unique('SERB').slice(0, 20),
      given_name: 'Bench',
      family_name: unique('Series'),
      date_of_birth: '1960-01-01',
    });
    await db('bed_stays').insert({ patient_id: id, bed_id: unit.bedIds[i], started_at: new Date(now - 80 * HOUR) });
    await db('target_orders').insert({
      patient_id: id,
      low: 92,
      high: 96,
      reason: 'bench',
      ordered_by: intensivist.id,
      ordered_at: new Date(now - 79 * HOUR),
    });
    const charted = [];
    for (let t = now - 72 * HOUR; t < now; t += HOUR) {
      charted.push({
        patient_id: id,
        bed_id: unit.bedIds[i],
        taken_at: new Date(t + 1),
        source: 'charted',
        spo2: 94,
        heart_rate: 84,
        resp_rate: 18,
        fio2: 0.35,
        device: 'simple_mask',
        flow_lpm: 5,
        trace: 'clean',
      });
    }
    await db('observations').insert(charted);
    patients.push(id);
  }
  // The monitored patient: one reading a second for 72 h, hovering around 92 % (the lower limit).
  const busy = patients[0]!;
  let seed = 42;
  const rand = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647;
  };
  let rows = [];
  let total = 0;
  const t0 = performance.now();
  for (let t = now - 72 * HOUR; t < now; t += 1000) {
    rows.push({
      patient_id: busy,
      taken_at: new Date(t),
      source: 'device',
      spo2: 90 + Math.floor(rand() * 5),
      heart_rate: 70 + Math.floor(rand() * 25),
      trace: rand() < 0.03 ? 'noisy' : 'clean',
    });
    if (rows.length === 5000) {
      await db('observations').insert(rows);
      total += rows.length;
      rows = [];
    }
  }
  if (rows.length) {
    await db('observations').insert(rows);
    total += rows.length;
  }
  for (const id of patients) await rebuildPatientRollup(db, id);
  console.log(
    `fixture: ${PATIENTS} patients, ${total.toLocaleString('en-GB')} device readings for one, rollup built, in ${Math.round((performance.now() - t0) / 1000)} s`,
  );

  const session = await signedIn(nurse.email, nurse.password);
  console.log(
    `\nGET /api/patients/:id/series for the one-per-second patient, ${REQUESTS} requests per window (after 3 warm-up)\n`,
  );
  console.log(
    `${'window'.padEnd(8)}${pad('p50 ms', 9)}${pad('p95 ms', 9)}${pad('bytes', 10)}${pad('SpO₂ pts', 10)}${pad('HR pts', 8)}${pad('FiO₂ pts', 10)}${pad('readings', 10)}`,
  );
  const p50s = new Map<number, number>();
  const sizes = new Map<number, number>();
  for (const hours of [6, 12, 24, 72]) {
    const times: number[] = [];
    let bytes = 0;
    let body: { spo2: unknown[]; heartRate: unknown[]; fio2: unknown[]; rawCounts: { spo2: number } } | undefined;
    for (let i = 0; i < REQUESTS + 3; i++) {
      const t = performance.now();
      const res = await session.get(`/api/patients/${busy}/series?hours=${hours}`);
      const text = await res.text();
      if (res.status !== 200) throw new Error(`series ${hours} h: ${res.status} ${text.slice(0, 200)}`);
      if (i >= 3) times.push(performance.now() - t);
      bytes = Buffer.byteLength(text);
      body = JSON.parse(text);
    }
    p50s.set(hours, pct(times, 50));
    sizes.set(hours, bytes);
    console.log(
      `${`${hours} h`.padEnd(8)}${pad(pct(times, 50).toFixed(1), 9)}${pad(pct(times, 95).toFixed(1), 9)}${pad(bytes.toLocaleString('en-GB'), 10)}${pad(body!.spo2.length, 10)}${pad(body!.heartRate.length, 8)}${pad(body!.fio2.length, 10)}${pad(body!.rawCounts.spo2.toLocaleString('en-GB'), 10)}`,
    );
  }
  const raw: number[] = [];
  for (let i = 0; i < 5; i++) {
    const t = performance.now();
    const n = (
      await db('observations')
        .where({ patient_id: busy, status: 'current' })
        .andWhere('taken_at', '>=', new Date(now - 72 * HOUR))
        .orderBy('taken_at')
        .select('taken_at', 'source', 'spo2', 'heart_rate', 'trace', 'perfusion_index')
    ).length;
    raw.push(performance.now() - t);
    if (i === 0)
      console.log(
        `\nfloor avoided: reading that patient's raw rows for 72 h (${n.toLocaleString('en-GB')} rows) from this script: p50 ${pct(raw, 50).toFixed(0)} ms`,
      );
  }
  console.log(`  (p50 of 5 reads: ${pct(raw, 50).toFixed(0)} ms)`);
  console.log(
    `\n72 h p50 / 6 h p50 = ${(p50s.get(72)! / p50s.get(6)!).toFixed(2)} (wanted ≤ 1.5); 72 h answer ${Math.round(sizes.get(72)! / 1024)} KB (wanted ≤ 150 KB)`,
  );
} finally {
  await db.destroy();
}
