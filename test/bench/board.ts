/**
 * Ward board under load. Seeds a hospital of 10 units × 30 beds with 72 h of one-per-minute device
 * readings and hourly charted obs per bed (~1.3 million readings), then runs GET /api/board with 20
 * concurrent signed-in pollers for 60 s and GET /api/health the same way (autocannon), and prints
 * p50 / p95 / p99, requests/s and the ratio board p95 / health p95. Figures only: nothing asserted.
 *
 * Run through `npm run bench -- board` (it starts the private services). BENCH_SECONDS shortens it.
 */
import autocannon from 'autocannon';
import { performance } from 'node:perf_hooks';
import { signedIn, APP_URL } from '../support/app.ts';
import { createUser, testDb, unique } from '../support/db.ts';
import { unitBoard } from '../../src/lib/server/board/board.ts';
import { closeDb, db as appDb } from '../../src/lib/server/queries/db.ts';

const UNITS = 10;
const BEDS = 30;
const HOURS = 72;
const SECONDS = Number(process.env.BENCH_SECONDS ?? 60);
const POLLERS = 20;
const db = testDb();

const now = Date.now();
const t0 = performance.now();
let readings = 0;
const intensivist = await createUser(db, { role: 'intensivist' });
const unitCodes: string[] = [];
const pollers: string[] = [];
for (let u = 0; u < UNITS; u++) {
  const code = unique('B').slice(0, 16);
  unitCodes.push(code);
  const [unitId] = await db('units').insert({
    code,
    name: `Bench unit ${u + 1}`,
    hospital: 'Bench Hospital',
    time_zone: 'Europe/London',
  });
  const rows: Record<string, unknown>[] = [];
  for (let b = 0; b < BEDS; b++) {
    const [bedId] = await db('beds').insert({ unit_id: unitId, label: `B${u}-${b}`, position: b });
    const [patientId] = await db('patients').insert({
      mrn: unique('BM').slice(0, 20),
      given_name: 'Bench',
      family_name: `Patient ${u}-${b}`,
      date_of_birth: '1960-01-01',
    });
    await db('bed_stays').insert({
      patient_id: patientId,
      bed_id: bedId,
      started_at: new Date(now - (HOURS + 1) * 3_600_000),
    });
    await db('target_orders').insert({
      patient_id: patientId,
      low: 92,
      high: 96,
      reason: 'bench',
      ordered_by: intensivist.id,
      ordered_at: new Date(now - (HOURS + 1) * 3_600_000),
    });
    // Every 5th bed desaturates in the last 20 minutes, so the board has work to sort.
    const dips = b % 5 === 0;
    for (let m = HOURS * 60; m >= 0; m--) {
      const spo2 = dips && m < 20 ? 88 : 93 + ((m * 7 + b) % 4);
      rows.push({
        patient_id: patientId,
        bed_id: bedId,
        taken_at: new Date(now - m * 60_000),
        source: 'device',
        spo2,
        heart_rate: 80 + (m % 9),
        trace: m % 97 === 0 ? 'noisy' : 'clean',
      });
      if (m % 60 === 7) {
        rows.push({
          patient_id: patientId,
          bed_id: bedId,
          taken_at: new Date(now - m * 60_000 + 1),
          source: 'charted',
          spo2,
          heart_rate: 82,
          resp_rate: 18,
          fio2: 0.28,
          device: 'nasal_cannula',
          flow_lpm: 2,
          trace: 'clean',
          systolic: 121,
          temperature: 37,
          consciousness: 'alert',
        });
      }
    }
  }
  for (let i = 0; i < rows.length; i += 10_000) await db('observations').insert(rows.slice(i, i + 10_000));
  readings += rows.length;
  for (let p = 0; p < POLLERS / UNITS; p++) {
    const charge = await createUser(db, { role: 'charge', unitId });
    pollers.push(`${charge.email}|${charge.password}|${code}`);
  }
}
console.log(
  `seeded ${UNITS} units × ${BEDS} beds, ${readings.toLocaleString()} readings in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
);

// Queries per board request, counted on the query builder (the same code the endpoint runs).
let queries = 0;
const count = () => {
  queries += 1;
};
appDb().on('query', count);
await unitBoard(
  { id: intensivist.id, email: '', name: '', role: 'intensivist', unitId: null, unitCode: null, unitName: null },
  unitCodes[0],
);
appDb().off('query', count);
await closeDb();

const sessions = await Promise.all(
  pollers.map(async (p) => {
    const [email, password, code] = p.split('|');
    const s = await signedIn(email!, password!);
    return { cookie: s.cookieHeader(), path: `/api/board?unit=${code}` };
  }),
);

/** Runs autocannon and keeps every response time, so p95 is exact (autocannon itself reports p97.5 and p99). */
async function load(name: string, pathFor: (i: number) => string) {
  let next = 0;
  const times: number[] = [];
  let non2xx = 0;
  const instance = autocannon({
    url: APP_URL,
    connections: POLLERS,
    duration: SECONDS,
    setupClient: (client: {
      setHeaders: (h: Record<string, string>) => void;
      setRequest: (r: { path: string; method: string }) => void;
    }) => {
      const i = next++ % sessions.length;
      client.setHeaders({ cookie: sessions[i]!.cookie, accept: 'application/json' });
      client.setRequest({ path: pathFor(i), method: 'GET' });
    },
  } as never);
  (instance as unknown as NodeJS.EventEmitter).on(
    'response',
    (_client: unknown, status: number, _bytes: number, ms: number) => {
      times.push(ms);
      if (status < 200 || status > 299) non2xx += 1;
    },
  );
  const result = (await new Promise((resolve) => (instance as unknown as NodeJS.EventEmitter).on('done', resolve))) as {
    errors: number;
    duration: number;
  };
  times.sort((a, b) => a - b);
  const pct = (q: number) => Math.round(times[Math.min(times.length - 1, Math.floor(q * times.length))]! * 10) / 10;
  return {
    name,
    p50: pct(0.5),
    p95: pct(0.95),
    p99: pct(0.99),
    rps: Math.round(times.length / SECONDS),
    total: times.length,
    non2xx,
    errors: result.errors,
  };
}

const board = await load('GET /api/board', (i) => sessions[i]!.path);
const health = await load('GET /api/health', () => '/api/health');
for (const r of [board, health]) {
  console.log(
    `${r.name.padEnd(16)} p50 ${r.p50} ms · p95 ${r.p95} ms · p99 ${r.p99} ms · ${r.rps} req/s · ${r.total} requests · non-2xx ${r.non2xx} · errors ${r.errors}`,
  );
}
console.log(
  `board p95 / health p95 = ${(board.p95 / Math.max(0.1, health.p95)).toFixed(2)} (wanted < 3); board p95 wanted < 50 ms`,
);
console.log(`queries per board request: ${queries} (the unit's beds: ${BEDS}; the same count for any bed count)`);
await db.destroy();
