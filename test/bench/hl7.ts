/**
 * HL7 v2 over MLLP against POST /api/ingest, same run, same readings: one gateway connection sends
 * ORU^R01 for 30 beds at one message per bed per second for 60 s (EBB_BENCH_SECONDS to change);
 * then the same readings (same values and times, for 30 other beds with their own patients) go
 * through POST /api/ingest, one request per bed per second. Prints messages/s sustained and ACK
 * (or HTTP answer) p50 / p95. Asserts nothing.
 *
 * Run by `npm run bench -- hl7` (the app, the MLLP listener and the database of test-env.sh).
 */
import { performance } from 'node:perf_hooks';
import { Hl7Client } from '@medplum/hl7';
import { buildOru } from '~/lib/hl7/oru.ts';
import { signedIn } from '../support/app.ts';
import { createUnit, createUser, testDb, unique } from '../support/db.ts';

const BEDS = 30;
const SECONDS = Number(process.env.EBB_BENCH_SECONDS ?? 60);
const APP_URL = process.env.APP_URL!;
const MLLP_PORT = Number(process.env.EBB_MLLP_PORT ?? 2575);
const db = testDb();

async function patientIn(bedId: number, from: Date): Promise<number> {
  const [id] = await db('patients').insert({
    mrn: unique('HLB').slice(0, 20),
    given_name: 'Bench',
    family_name: unique('Gate'),
    date_of_birth: '1970-01-01',
  });
  await db('bed_stays').insert({ patient_id: id, bed_id: bedId, started_at: from });
  return id;
}

const pct = (sorted: number[], p: number) =>
  sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, Math.max(0, ms)));

/** Runs `send(bed, second)` for every bed once a second for SECONDS s; returns latencies and the elapsed time. */
async function paced(send: (bed: number, second: number) => Promise<boolean>) {
  const latencies: number[] = [];
  let failed = 0;
  const pending: Promise<void>[] = [];
  const t0 = performance.now();
  for (let s = 0; s < SECONDS; s++) {
    await sleep(t0 + s * 1000 - performance.now());
    for (let b = 0; b < BEDS; b++) {
      pending.push(
        (async () => {
          const start = performance.now();
          const ok = await send(b, s).catch(() => false);
          if (ok) latencies.push(performance.now() - start);
          else failed++;
        })(),
      );
    }
  }
  await Promise.all(pending);
  const elapsed = performance.now() - t0;
  return { latencies: latencies.sort((a, b) => a - b), failed, elapsed };
}

function report(name: string, r: Awaited<ReturnType<typeof paced>>) {
  const n = r.latencies.length;
  console.log(
    `${name.padEnd(28)} ${String(n).padStart(6)} ok ${String(r.failed).padStart(4)} failed  ${(n / (r.elapsed / 1000)).toFixed(1).padStart(6)} msg/s  p50 ${pct(r.latencies, 50).toFixed(1).padStart(6)} ms  p95 ${pct(r.latencies, 95).toFixed(1).padStart(6)} ms  max ${r.latencies[n - 1]?.toFixed(1) ?? '-'} ms`,
  );
}

try {
  const unit = await createUnit(db, BEDS * 2);
  const admin = await createUser(db, { role: 'admin' });
  const adminS = await signedIn(admin.email, admin.password);
  const admitted = new Date(Date.now() - 3_600_000);
  await Promise.all(unit.bedIds.map((b) => patientIn(b, admitted)));

  const app = unique('BENCH').slice(0, 20);
  const gw = await (
    await adminS.post('/api/admin/hl7-gateways', {
      label: 'bench gateway',
      sendingApplication: app,
      sendingFacility: 'BENCH',
    })
  ).json();
  for (let b = 0; b < BEDS; b++) {
    const res = await adminS.post(`/api/admin/hl7-gateways/${gw.gateway.id}/beds`, {
      bedName: `BENCH^^${b}`,
      bedId: unit.bedIds[b],
    });
    if (res.status !== 201) throw new Error(`mapping failed: ${await res.text()}`);
  }
  const keys: string[] = [];
  for (let b = 0; b < BEDS; b++)
    keys.push(
      (
        await (
          await adminS.post('/api/admin/device-keys', { bedId: unit.bedIds[BEDS + b], label: `bench ${b}` })
        ).json()
      ).key,
    );

  const base = Math.floor(Date.now() / 1000) * 1000 - (SECONDS + 5) * 1000;
  const reading = (bed: number, s: number) => ({
    at: new Date(base + s * 1000),
    spo2: 90 + ((bed + s) % 8),
    heartRate: 70 + ((bed * 3 + s) % 30),
    perfusionIndex: 1 + ((bed + s) % 20) / 10,
  });

  console.log(
    `HL7 v2 over MLLP vs POST /api/ingest: ${BEDS} beds, one message (one reading) per bed per second, ${SECONDS} s each`,
  );
  const client = new Hl7Client({ host: '127.0.0.1', port: MLLP_PORT, keepAlive: true });
  await client.connect();
  let seq = 0;
  const hl7 = await paced(async (b, s) => {
    const msg = buildOru({
      application: app,
      facility: 'BENCH',
      controlId: `B${++seq}`,
      bedName: `BENCH^^${b}`,
      sentAt: new Date(),
      readings: [reading(b, s)],
    });
    const ack = await client.sendAndWait(msg, { returnAck: 'first', timeoutMs: 60_000 });
    return ack.getSegment('MSA')?.getField(1).toString() === 'AA';
  });
  await client.close();
  report('MLLP ORU^R01 (one connection)', hl7);

  const ingest = await paced(async (b, s) => {
    const r = reading(b, s);
    const res = await fetch(`${APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${keys[b]}` },
      body: JSON.stringify({
        readings: [{ at: r.at.toISOString(), spo2: r.spo2, heartRate: r.heartRate, perfusionIndex: r.perfusionIndex }],
      }),
    });
    await res.arrayBuffer();
    return res.ok;
  });
  report('POST /api/ingest (HTTP)', ingest);

  const [{ n: hl7Rows }] = await db('observations')
    .whereIn('bed_id', unit.bedIds.slice(0, BEDS))
    .where({ source: 'device' })
    .count({ n: '*' });
  const [{ n: jsonRows }] = await db('observations')
    .whereIn('bed_id', unit.bedIds.slice(BEDS))
    .where({ source: 'device' })
    .count({ n: '*' });
  console.log(
    `stored: ${hl7Rows} readings through MLLP, ${jsonRows} through POST /api/ingest (target ${BEDS * SECONDS} each)`,
  );
} finally {
  await db.destroy();
}
