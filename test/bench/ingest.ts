/**
 * Readings per second stored by POST /api/ingest (batches of 3,600, one client) and by the
 * trend-file commit (one file of 86,400 per-second rows), each beside the floor: a plain
 * multi-row INSERT of the same rows into the same table from this script, in the same run.
 *
 * Run against a running app and its database (the environment of docker-free-scripts/test.sh):
 *   DB_HOST=… DB_PORT=… DB_USER=… DB_PASSWORD=… DB_NAME=… APP_URL=… node --import tsx test/bench/ingest.ts
 * It adds its own fixture unit, beds, users and patients (invented), and prints figures; it asserts nothing.
 */
import { performance } from 'node:perf_hooks';
import { type HttpSession, signedIn } from '../support/app.ts';
import { createUnit, createUser, testDb, unique } from '../support/db.ts';

const ROWS = 86_400;
const BATCH = 3_600;
const db = testDb();

async function patientIn(bedId: number, from: Date): Promise<number> {
  const [id] = await db('patients').insert({
    mrn: unique('BEN').slice(0, 20),
    given_name: 'Bench',
    family_name: unique('Mark'),
    date_of_birth: '1970-01-01',
  });
  await db('bed_stays').insert({ patient_id: id, bed_id: bedId, started_at: from });
  return id;
}

const rate = (n: number, ms: number) => Math.round(n / (ms / 1000));
const pad = (s: string | number, w: number) => String(s).padStart(w);

try {
  const unit = await createUnit(db, 5);
  const admin = await createUser(db, { role: 'admin' });
  const nurse = await createUser(db, { role: 'nurse', unitId: unit.unitId });
  const adminS = await signedIn(admin.email, admin.password);
  const nurseS: HttpSession = await signedIn(nurse.email, nurse.password);
  // A day of one-per-second readings (the feed takes up to 24 h back).
  // The last reading a minute ahead (inside the 2 min clock slack) so the first is still under 24 h old when sent.
  const end = Date.now() + 60_000;
  const start = end - (ROWS - 1) * 1000;
  const admitted = new Date(start - 3_600_000);
  const [, pFile, pFloorA, pFloorB, pFloorC] = await Promise.all(unit.bedIds.map((b) => patientIn(b, admitted)));
  const keyRes = await adminS.post('/api/admin/device-keys', { bedId: unit.bedIds[0], label: 'bench gateway' });
  const { key } = (await keyRes.json()) as { key: string };

  const reading = (i: number) => ({
    t: start + i * 1000,
    spo2: 90 + (i % 9),
    hr: 60 + (i % 40),
    pi: 1 + (i % 30) / 10,
  });

  // ── POST /api/ingest: 24 batches of 3,600, one client, one after another ──
  const batches: string[] = [];
  for (let b = 0; b < ROWS / BATCH; b++) {
    const readings = [];
    for (let i = b * BATCH; i < (b + 1) * BATCH; i++) {
      const r = reading(i);
      readings.push({
        at: new Date(r.t).toISOString(),
        spo2: r.spo2,
        heartRate: r.hr,
        perfusionIndex: r.pi,
        trace: 'clean',
      });
    }
    batches.push(JSON.stringify({ readings }));
  }
  const rowOf = (patientId: number, bedId: number, i: number, source: 'device' | 'import') => {
    const r = reading(i);
    return {
      patient_id: patientId,
      bed_id: bedId,
      taken_at: new Date(r.t),
      source,
      spo2: r.spo2,
      heart_rate: r.hr,
      perfusion_index: r.pi,
      trace: 'clean',
      recorded_at: new Date(),
    };
  };
  // Batch by batch, the API and its floor take turns, so both see the same load on a shared machine.
  // The floor is the same rows as one multi-row INSERT of 3,600 per batch (autocommit, as one statement).
  let ingestMs = 0;
  let floorAMs = 0;
  let stored = 0;
  for (let b = 0; b < batches.length; b++) {
    let t0 = performance.now();
    const res = await fetch(`${process.env.APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
      body: batches[b],
    });
    if (!res.ok) throw new Error(`ingest ${res.status}: ${await res.text()}`);
    stored += ((await res.json()) as { stored: number }).stored;
    ingestMs += performance.now() - t0;
    const rows = [];
    for (let i = b * BATCH; i < (b + 1) * BATCH; i++) rows.push(rowOf(pFloorA, unit.bedIds[2]!, i, 'device'));
    t0 = performance.now();
    await db('observations').insert(rows);
    floorAMs += performance.now() - t0;
  }
  if (stored !== ROWS) throw new Error(`ingest stored ${stored}, expected ${ROWS}`);

  // ── Trend-file commit: one CSV of 86,400 rows (no preview first, which costs as much again) ──
  const lines = ['Time,SpO2,HR,PI,Quality'];
  for (let i = 0; i < ROWS; i++) {
    const r = reading(i);
    lines.push(`${new Date(r.t).toISOString()},${r.spo2},${r.hr},${r.pi},clean`);
  }
  const csv = `${lines.join('\n')}\n`;
  const q = new URLSearchParams({
    time: 'Time',
    spo2: 'SpO2',
    heartRate: 'HR',
    perfusionIndex: 'PI',
    quality: 'Quality',
    timeMode: 'iso',
    fileName: 'bench-day.csv',
  });
  // Floor for the commit: the same rows in one transaction, multi-row INSERTs of 5,000 (the commit's
  // chunk size), run once before and once after the commit; the mean is the floor.
  const floorB = async (patientId: number, bedId: number) => {
    const t = performance.now();
    await db.transaction(async (trx) => {
      for (let b = 0; b < ROWS; b += 5000) {
        const rows = [];
        for (let i = b; i < Math.min(ROWS, b + 5000); i++) rows.push(rowOf(patientId, bedId, i, 'import'));
        await trx('observations').insert(rows);
      }
    });
    return performance.now() - t;
  };
  const floorBefore = await floorB(pFloorB, unit.bedIds[3]!);
  let t0 = performance.now();
  const commit = await nurseS.request(`/api/patients/${pFile}/imports/commit?${q}`, {
    method: 'POST',
    headers: { 'content-type': 'text/csv' },
    body: csv,
  });
  const commitMs = performance.now() - t0;
  if (commit.status !== 201) throw new Error(`commit ${commit.status}: ${await commit.text()}`);
  const committed = ((await commit.json()) as { import: { rowsStored: number } }).import.rowsStored;
  if (committed !== ROWS) throw new Error(`commit stored ${committed}, expected ${ROWS}`);
  const floorAfter = await floorB(pFloorC, unit.bedIds[4]!);
  const floorBMs = (floorBefore + floorAfter) / 2;

  // For the record: the preview of the same file (parse, checks, nothing stored) — now a duplicate, which it reports.
  t0 = performance.now();
  const preview = await nurseS.request(`/api/patients/${pFile}/imports/preview?${q}`, {
    method: 'POST',
    headers: { 'content-type': 'text/csv' },
    body: csv,
  });
  const previewMs = performance.now() - t0;
  if (preview.status !== 200) throw new Error(`preview ${preview.status}`);

  const [{ n }] = await db('observations').count({ n: '*' });
  console.log(
    `\nStored readings per second (${ROWS.toLocaleString('en-GB')} rows each; observations table now holds ${Number(n).toLocaleString('en-GB')} rows)\n`,
  );
  console.log(`${'path'.padEnd(56)}${pad('ms', 9)}${pad('rows/s', 10)}${pad('× floor', 9)}`);
  const line = (label: string, ms: number, floor?: number) =>
    console.log(
      `${label.padEnd(56)}${pad(Math.round(ms), 9)}${pad(rate(ROWS, ms), 10)}${pad(floor ? (ms / floor).toFixed(2) : '', 9)}`,
    );
  line('POST /api/ingest, 24 × 3,600, one client', ingestMs, floorAMs);
  line('  floor: 24 multi-row INSERTs of 3,600 from a script', floorAMs);
  line('trend-file commit, 86,400-row CSV (one request)', commitMs, floorBMs);
  line('  floor: 1 transaction, INSERTs of 5,000 (mean of 2)', floorBMs);
  line('  (preview of the same file, nothing stored)', previewMs);
  console.log('\nWanted: each path within 2× of its floor (× floor ≤ 2).');
} finally {
  await db.destroy();
}
