/**
 * The cluster drill's load and its account (run by docker-free-scripts/drill.sh, never on its own).
 *
 * One phase: makes the drill hospital in the (empty) database, then for DRILL_SECONDS
 *  - every bed's gateway sends one reading a second in 15-second batches through POST /api/ingest
 *    (the real path, through the app proxy); a batch that is not acknowledged is sent again, with
 *    the next one, until it is — only a 2xx counts as acknowledged;
 *  - DRILL_POLLERS board pollers (signed in as the drill intensivist) poll GET /api/board;
 *  - DRILL_NURSES charge nurses chart obs every few seconds;
 *  - with DRILL_FAULTS=on: SIGKILLs database node 1 (the writer) and restarts it (it must rejoin),
 *    then SIGKILLs app instance 1 and restarts it, through cluster-ctl.sh.
 * Then it waits for the outbox to drain and prints one figure a line, and writes them as JSON to
 * DRILL_RESULT. Exit code 1 when anything acknowledged was lost, anything was duplicated, or the
 * escalations raised differ from those expected.
 */
import { spawn } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import knexFactory from 'knex';
import { connectionFromEnv } from '~/lib/server/queries/connection.ts';
import { HttpSession } from '../support/app.ts';
import { createDrillHospital, DRILL_PASSWORD, type DrillBed } from './hospital.ts';

const env = (name: string, fallback: number) => Number(process.env[name] ?? fallback);
const PHASE = process.env.DRILL_PHASE ?? 'cluster';
const SECONDS = env('DRILL_SECONDS', 600);
const UNITS = env('DRILL_UNITS', 30);
const BEDS = env('DRILL_BEDS', 30);
const POLLERS = env('DRILL_POLLERS', 40);
const NURSES = env('DRILL_NURSES', 5);
const FAULTS = process.env.DRILL_FAULTS === 'on';
const APP_FAULT = process.env.DRILL_APP_FAULT !== 'off';
const APP_URL = process.env.APP_URL!;
const FAKE_API = process.env.SMTP_FAKE_API_URL!;
const BATCH_S = 15;

const knex = knexFactory(connectionFromEnv({ ...process.env, DB_POOL_MAX: '4' }));
const t0 = Date.now();
const elapsed = () => (Date.now() - t0) / 1000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const log = (msg: string) => console.log(`[drill ${PHASE} ${elapsed().toFixed(0).padStart(4)} s] ${msg}`);

// ── what the clients saw ─────────────────────────────────────────────────────────────────────
const acknowledged = new Set<string>();
let readingsSent = 0;
let ingestFailures = 0;
const boardLatencies: number[] = [];
const pollErrorSeconds = new Set<number>();
let pollErrors = 0;
let chartedOk = 0;
let chartFailures = 0;
const faults: { name: string; at: number }[] = [];

function readingsFor(bed: DrillBed, fromMs: number, toMs: number) {
  const out = [];
  for (let t = fromMs; t < toMs; t += 1000) {
    // The desaturating beds fall below band 20 s in and stay there: a sustained run.
    const low = bed.desaturates && t - t0 > 20_000;
    out.push({
      at: new Date(t).toISOString(),
      spo2: low ? 84 : 95 + ((t / 1000) % 2),
      heartRate: 80,
      perfusionIndex: 2.5,
      trace: 'clean',
    });
  }
  return out;
}

async function feed(bed: DrillBed, offsetMs: number, stopAt: number) {
  await sleep(offsetMs);
  let from = Math.floor((Date.now() - BATCH_S * 1000) / 1000) * 1000;
  let pending: ReturnType<typeof readingsFor> = [];
  for (;;) {
    const to = Math.floor(Date.now() / 1000) * 1000;
    const last = Date.now() >= stopAt;
    if (to > from) {
      const fresh = readingsFor(bed, from, to);
      readingsSent += fresh.length;
      pending = pending.concat(fresh);
      from = to;
    }
    if (pending.length) {
      try {
        const res = await fetch(`${APP_URL}/api/ingest`, {
          method: 'POST',
          headers: { authorization: `Bearer ${bed.key}`, 'content-type': 'application/json' },
          body: JSON.stringify({ readings: pending.slice(0, 3600) }),
          signal: AbortSignal.timeout(20_000),
        });
        await res.arrayBuffer();
        if (res.ok) {
          for (const r of pending.slice(0, 3600)) acknowledged.add(`${bed.bedId}|${Date.parse(r.at)}`);
          pending = pending.slice(3600);
        } else ingestFailures++;
      } catch {
        ingestFailures++;
      }
    }
    if (last && (pending.length === 0 || Date.now() > stopAt + 60_000)) return pending.length;
    await sleep(last ? 1000 : BATCH_S * 1000);
  }
}

/** Poller errors by kind ("HTTP 503", "no answer in 10 s", …), so overload and faults can be told apart. */
const pollErrorKinds = new Map<string, number>();
function pollFailed(kind: string) {
  pollErrors++;
  pollErrorSeconds.add(Math.floor(elapsed()));
  pollErrorKinds.set(kind, (pollErrorKinds.get(kind) ?? 0) + 1);
}

async function poll(session: HttpSession, unit: string, stopAt: number) {
  while (Date.now() < stopAt) {
    const started = performance.now();
    try {
      const res = await session.request(`/api/board?unit=${unit}`, { signal: AbortSignal.timeout(10_000) });
      await res.arrayBuffer();
      if (res.ok) boardLatencies.push(performance.now() - started);
      else pollFailed(`HTTP ${res.status}`);
    } catch (err) {
      pollFailed((err as Error).name === 'TimeoutError' ? 'no answer in 10 s' : 'connection failed');
    }
    await sleep(2000);
  }
}

async function chart(session: HttpSession, patients: number[], stopAt: number) {
  let i = 0;
  while (Date.now() < stopAt) {
    const patientId = patients[i++ % patients.length]!;
    try {
      const res = await session.post(`/api/patients/${patientId}/observations`, {
        takenAt: new Date(Date.now() - 5000).toISOString(),
        spo2: 95,
        heartRate: 82,
        respRate: 16,
        device: 'room_air',
        trace: 'clean',
      });
      await res.arrayBuffer();
      if (res.status === 201) chartedOk++;
      else chartFailures++;
    } catch {
      chartFailures++;
    }
    await sleep(3000 + Math.random() * 2000);
  }
}

function ctl(action: string, n: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn('bash', ['docker-free-scripts/cluster-ctl.sh', action, String(n)], { stdio: 'inherit' });
    child.on('exit', (code) =>
      code === 0 ? resolve() : reject(new Error(`cluster-ctl ${action} ${n} exited ${code}`)),
    );
  });
}

async function fault(name: string, atS: number, action: string, n: number) {
  await sleep(Math.max(0, t0 + atS * 1000 - Date.now()));
  log(name);
  faults.push({ name, at: elapsed() });
  await ctl(action, n);
  log(`${name}: done`);
}

async function signedInAs(email: string) {
  for (let attempt = 0; ; attempt++) {
    const s = new HttpSession(APP_URL);
    const r = await s.signIn(email, DRILL_PASSWORD).catch(() => ({ ok: false, url: 'network error' }));
    if (r.ok) return s;
    if (attempt > 10) throw new Error(`drill sign-in as ${email} failed: ${r.url}`);
    await sleep(1000);
  }
}

const pct = (xs: number[], p: number) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!;
};

async function outboxDrained(timeoutMs: number) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const [row] = await knex('mail_outbox').whereNot('status', 'sent').count<{ n: number }[]>({ n: '*' });
    if (Number(row!.n) === 0 || Date.now() > until) return Number(row!.n);
    await sleep(1000);
  }
}

async function main() {
  log(`making the drill hospital: ${UNITS} units × ${BEDS} beds`);
  const hospital = await createDrillHospital(knex, UNITS, BEDS, { deviceDwellMin: 1, renotifyMin: 240 });
  const stopAt = Date.now() + SECONDS * 1000;
  const work: Promise<unknown>[] = [];
  const pollerSession = await signedInAs(hospital.intensivist);
  for (let i = 0; i < POLLERS; i++) work.push(poll(pollerSession, hospital.units[i % hospital.units.length]!, stopAt));
  for (const nurse of hospital.nurses.slice(0, NURSES)) {
    const session = await signedInAs(nurse.email);
    const patients = hospital.beds
      .filter((b) => b.unitCode === nurse.unitCode && !b.desaturates)
      .map((b) => b.patientId);
    work.push(chart(session, patients, stopAt));
  }
  const feeds = hospital.beds.map((bed, i) => feed(bed, (i / hospital.beds.length) * BATCH_S * 1000, stopAt));
  log(`${hospital.beds.length} feeds, ${POLLERS} pollers, ${Math.min(NURSES, hospital.nurses.length)} nurses charting`);
  if (FAULTS) {
    work.push(
      (async () => {
        await fault('kill database node 1 (the writer)', SECONDS * 0.3, 'kill-node', 1);
        await fault('restart database node 1 (rejoin)', SECONDS * 0.5, 'start-node', 1);
        if (APP_FAULT) {
          await fault('kill app instance 1', SECONDS * 0.65, 'kill-app', 1);
          await fault('restart app instance 1', SECONDS * 0.8, 'start-app', 1);
        }
      })(),
    );
  }
  await Promise.all(work);
  const unacknowledged = (await Promise.all(feeds)).reduce((a, b) => a + b, 0);
  log('load finished; waiting for the outbox to drain');
  const mailPending = await outboxDrained(90_000);
  // The sweep may still be raising an escalation from the last readings: give it one interval.
  await sleep(Number(process.env.EBB_SWEEP_INTERVAL_MS ?? 20_000) + 2000);
  await outboxDrained(30_000);

  const bedIds = hospital.beds.map((b) => b.bedId);
  const stored = await knex('observations')
    .whereIn('device_bed_id', bedIds)
    .where('source', 'device')
    .select('device_bed_id', 'taken_at');
  const storedKeys = new Set(stored.map((r) => `${r.device_bed_id}|${new Date(r.taken_at).getTime()}`));
  let lost = 0;
  for (const k of acknowledged) if (!storedKeys.has(k)) lost++;
  const duplicateReadings = stored.length - storedKeys.size;
  const desaturating = new Set(hospital.beds.filter((b) => b.desaturates).map((b) => b.patientId));
  const patientIds = hospital.beds.map((b) => b.patientId);
  const escalations = await knex('escalations')
    .whereIn('patient_id', patientIds)
    .where('kind', 'below_band')
    .select('id', 'patient_id');
  const raisedFor = new Set(escalations.map((e) => e.patient_id));
  const expectedRaised = [...desaturating].filter((p) => raisedFor.has(p)).length;
  const unexpected = escalations.filter((e) => !desaturating.has(e.patient_id)).length;
  const duplicateEscalations = escalations.length - raisedFor.size;
  const outbox = await knex('mail_outbox')
    .whereIn(
      'escalation_id',
      escalations.map((e) => e.id),
    )
    .select('idempotency_key');
  const messages = (
    (await (await fetch(`${FAKE_API}/messages`)).json()) as {
      messages: { key: string | null; messageId: string | null }[];
    }
  ).messages;
  const outboxKeys = new Set(outbox.map((o) => o.idempotency_key));
  const received = messages.filter((m) => m.key && outboxKeys.has(m.key));
  const receivedKeys = new Set(received.map((m) => m.key));
  const duplicateMails = received.length - receivedKeys.size;
  // Under load alone (before the first fault), for comparison with the windows after each fault.
  const firstFaultAt = faults[0]?.at ?? SECONDS;
  const errorSecondsBeforeFaults = [...pollErrorSeconds].filter((s) => s < Math.floor(firstFaultAt) - 1).length;
  const errorSecondsAround = faults.map((f, i) => {
    const end = faults[i + 1]?.at ?? SECONDS;
    let n = 0;
    for (const s of pollErrorSeconds) if (s >= Math.floor(f.at) - 1 && s < end) n++;
    return { fault: f.name, at: Math.round(f.at), errorSeconds: n };
  });

  const figures = {
    phase: PHASE,
    seconds: SECONDS,
    beds: hospital.beds.length,
    readingsSent,
    readingsAcknowledged: acknowledged.size,
    readingsStored: storedKeys.size,
    readingsUnacknowledgedAtEnd: unacknowledged,
    readingsLost: lost,
    duplicateReadings,
    ingestFailures,
    escalationsExpected: desaturating.size,
    escalationsRaised: raisedFor.size,
    escalationsOfExpected: expectedRaised,
    unexpectedEscalations: unexpected,
    duplicateEscalations,
    mailsExpected: outboxKeys.size,
    mailsReceived: receivedKeys.size,
    duplicateMails,
    mailPending,
    boardRequests: boardLatencies.length,
    boardErrors: pollErrors,
    boardP50Ms: pct(boardLatencies, 50),
    boardP95Ms: pct(boardLatencies, 95),
    obsCharted: chartedOk,
    obsChartFailures: chartFailures,
    errorSecondsAround,
    errorSecondsBeforeFaults,
    pollErrorKinds: Object.fromEntries(pollErrorKinds),
  };
  const p = (label: string, value: unknown) => console.log(`${PHASE}: ${label}: ${value}`);
  p('readings sent', readingsSent);
  p('readings acknowledged vs stored', `${acknowledged.size} vs ${storedKeys.size}`);
  p('readings lost', lost);
  p('duplicate readings', duplicateReadings);
  p('ingest requests refused or failed (then re-sent)', ingestFailures);
  p('readings never acknowledged at the end', unacknowledged);
  p(
    'escalations expected vs raised',
    `${desaturating.size} vs ${raisedFor.size} (${unexpected} unexpected, ${duplicateEscalations} duplicate)`,
  );
  p('mails expected vs received', `${outboxKeys.size} vs ${receivedKeys.size}`);
  p('duplicate mails', duplicateMails);
  p(
    'board p50 / p95',
    `${figures.boardP50Ms.toFixed(1)} ms / ${figures.boardP95Ms.toFixed(1)} ms over ${boardLatencies.length} requests (${pollErrors} errors)`,
  );
  p('obs charted', `${chartedOk} (${chartFailures} failed and were not retried)`);
  p('poller errors by kind', [...pollErrorKinds].map(([k, n]) => `${k}: ${n}`).join(', ') || 'none');
  if (faults.length)
    p(
      `seconds with poller errors before the first fault (0–${Math.round(firstFaultAt)} s, load alone)`,
      errorSecondsBeforeFaults,
    );
  for (const f of errorSecondsAround) p(`seconds with poller errors after "${f.fault}" (at ${f.at} s)`, f.errorSeconds);
  if (process.env.DRILL_RESULT) writeFileSync(process.env.DRILL_RESULT, JSON.stringify(figures, null, 2));
  await knex.destroy();
  const ok =
    lost === 0 &&
    duplicateReadings === 0 &&
    duplicateMails === 0 &&
    duplicateEscalations === 0 &&
    unexpected === 0 &&
    raisedFor.size === desaturating.size &&
    receivedKeys.size === outboxKeys.size;
  p('verdict', ok ? 'nothing lost, nothing duplicated' : 'FAILED');
  process.exit(ok ? 0 : 1);
}

main().catch(async (err) => {
  console.error(err);
  await knex.destroy().catch(() => {});
  process.exit(2);
});
