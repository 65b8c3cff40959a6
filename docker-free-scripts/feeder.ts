/**
 * Demo feeder: plays invented bedside-monitor readings into the demo beds, as a gateway would, so
 * the ward board lives. Started by start.sh (EBB_FEEDER=off skips it). Two ways in, one source of
 * readings (`nextReadings`), chosen by EBB_FEEDER_VIA:
 *   http (default)  POST /api/ingest with one device key per monitored demo bed, made at start
 *                   (audited, actor "system"); the keys stay in this process's memory, never printed.
 *   mllp            HL7 v2 ORU^R01 over MLLP to the listener (EBB_MLLP_HOST / EBB_MLLP_PORT), as the
 *                   demo gateway EBBDEMO^HARBOURSIDE with bed names UNIT^^BED. The gateway and its bed
 *                   mappings are registered through the admin service functions (audited, actor
 *                   "system") the first time and reused afterwards, so restarts add no gateway. Each
 *                   message waits for its ACK; AA / AE / AR are counted and logged.
 * Either way the keys of its previous HTTP run are revoked at start (no one holds them any more).
 * Each bed carries on from its patient's latest device readings (a desaturating patient stays low).
 *
 * It plays until Ctrl-C (SIGINT/SIGTERM): its wait timer holds the process open (an unref'd timer
 * let Node exit after the first cycle once the database pool was idle). Failures are reported —
 * the first of a run and then every 20th — and it recovers by itself: when the database is down at
 * start it retries the set-up, when the app or the listener is away the readings of the missed
 * cycles are sent once it answers again (over MLLP on a fresh connection), and when its keys or its
 * gateway are refused (another feeder took over, an admin revoked or unmapped) it sets up anew.
 */
import { Hl7Client } from '@medplum/hl7';
import type { Hl7Message } from '@medplum/core';
import { buildOru, HL7_ERROR } from '../src/lib/hl7/oru.ts';
import { gatewayBedSchema, gatewayCreateSchema } from '../src/lib/hl7/gateway-input.ts';
import { createDeviceKey, revokeKey } from '../src/lib/server/devices/keys.ts';
import { createGateway, mapGatewayBed, unmapGatewayBed } from '../src/lib/server/hl7/gateways.ts';
import { ApiError } from '../src/lib/server/http.ts';
import { closeDb, db } from '../src/lib/server/queries/db.ts';
import { findGatewayBed, liveGatewayBySender } from '../src/lib/server/queries/hl7-gateways.ts';
import { liveKeyIdsLabelled, occupiedBedsWithDeviceReadings, recentDeviceReadings } from './feeder-queries.ts';

const APP_URL = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 4321}`;
const LABEL = 'demo feeder';
const STEP_MS = 5_000;
const CYCLE_MS = Number(process.env.EBB_FEEDER_CYCLE_MS ?? 15_000);
const UNITS = (process.env.EBB_FEEDER_UNITS ?? 'L4ICU,L5HDU').split(',');
const VIA = (process.env.EBB_FEEDER_VIA ?? '').trim() || 'http';
if (VIA !== 'http' && VIA !== 'mllp') {
  console.error(
    `[feeder] EBB_FEEDER_VIA must be "http" (POST /api/ingest, the default) or "mllp" (HL7 v2 to the MLLP listener), not "${VIA}"`,
  );
  process.exit(1);
}
const MLLP_HOST = process.env.EBB_MLLP_HOST ?? '127.0.0.1';
const MLLP_PORT = Number(process.env.EBB_MLLP_PORT ?? 2575);
const GATEWAY = { application: 'EBBDEMO', facility: 'HARBOURSIDE' };
/** One hour of one bed per message, so a long gap goes as a few messages of bounded size. */
const READINGS_PER_MESSAGE = 720;
const ACK_TIMEOUT_MS = 10_000;

interface BedFeed {
  bedLabel: string;
  /** How the bed is addressed: its device key (http) or its PV1-3 bed name (mllp). */
  route: string;
  level: number;
  spo2: number;
  hr: number;
  pi: number;
  lastAt: number;
  motionUntil: number;
}
interface Reading {
  at: string;
  spo2: number;
  heartRate: number;
  perfusionIndex: number;
  trace: 'clean' | 'noisy';
}
/**
 * What sending one bed's readings came to: how many were stored, and if not all went, why
 * (`refused`: our key or gateway is no longer accepted). A failed span is played again next cycle.
 */
interface Sent {
  stored: number;
  failure?: string;
  refused?: boolean;
}

const log = (msg: string) => console.log(`[feeder] ${msg}`);
let rand = 0x2f6b1d;
const random = () => {
  rand ^= rand << 13;
  rand >>>= 0;
  rand ^= rand >>> 17;
  rand ^= rand << 5;
  rand >>>= 0;
  return rand / 4294967296;
};

async function setUp(): Promise<BedFeed[]> {
  for (const id of await liveKeyIdsLabelled(db(), LABEL)) await revokeKey(null, id, 'demo feeder restarted');
  const beds = await occupiedBedsWithDeviceReadings(UNITS);
  const gatewayId = VIA === 'mllp' ? await demoGateway() : null;
  const feeds: BedFeed[] = [];
  for (const bed of beds) {
    const recent = await recentDeviceReadings(bed.patient_id, 10);
    const spo2s = recent.map((r) => r.spo2).filter((v): v is number => v !== null);
    const level = spo2s.length ? spo2s.reduce((a, b) => a + b, 0) / spo2s.length : 95;
    const hrs = recent.map((r) => r.heart_rate).filter((v): v is number => v !== null);
    const route =
      gatewayId === null
        ? (await createDeviceKey(null, { bedId: bed.bed_id, label: LABEL })).key
        : await demoBedName(gatewayId, bed);
    const last = recent[0] ? new Date(recent[0].taken_at).getTime() : Date.now() - 60_000;
    feeds.push({
      bedLabel: bed.bed_label,
      route,
      level,
      spo2: level,
      hr: hrs.length ? hrs[0]! : 80,
      pi: Number(recent[0]?.perfusion_index ?? 2) || 2,
      lastAt: Math.max(last, Date.now() - 10 * 60_000),
      motionUntil: 0,
    });
  }
  return feeds;
}

/** The live demo gateway, registered the first time (audited as the system); an existing one is reused. */
async function demoGateway(): Promise<number> {
  const live = await liveGatewayBySender(GATEWAY.application, GATEWAY.facility);
  if (live) return live.id;
  try {
    const input = gatewayCreateSchema.parse({
      label: LABEL,
      sendingApplication: GATEWAY.application,
      sendingFacility: GATEWAY.facility,
    });
    const made = await createGateway(null, input);
    log(`registered HL7 gateway ${GATEWAY.application}^${GATEWAY.facility} (id ${made.id})`);
    return made.id;
  } catch (err) {
    // Another feeder registered it between our look and our insert: use theirs.
    const raced =
      err instanceof ApiError && err.code === 'sender_taken'
        ? await liveGatewayBySender(GATEWAY.application, GATEWAY.facility)
        : undefined;
    if (raced) return raced.id;
    throw err;
  }
}

/** The bed's PV1-3 name (point of care ^^ bed), mapped to it on the demo gateway unless it already is. */
async function demoBedName(
  gatewayId: number,
  bed: { bed_id: number; bed_label: string; unit_code: string },
): Promise<string> {
  const clean = (t: string) => t.replace(/[|^~\\&\r\n]/g, '-');
  const bedName = `${clean(bed.unit_code)}^^${clean(bed.bed_label)}`;
  const mapped = await findGatewayBed(gatewayId, bedName);
  if (mapped?.bed_id === bed.bed_id) return bedName;
  if (mapped) await unmapGatewayBed(null, gatewayId, mapped.id); // the name now means another bed
  try {
    await mapGatewayBed(null, gatewayId, gatewayBedSchema.parse({ bedName, bedId: bed.bed_id }));
  } catch (err) {
    if (!(err instanceof ApiError && err.code === 'bed_name_taken')) throw err;
  }
  return bedName;
}

function nextReadings(f: BedFeed, until: number): Reading[] {
  const out: Reading[] = [];
  for (let t = Math.floor(f.lastAt / STEP_MS) * STEP_MS + STEP_MS; t <= until; t += STEP_MS) {
    // Mean-reverting walk around the patient's own level; now and then a short spell of movement.
    f.spo2 += (f.level - f.spo2) * 0.1 + (random() - 0.5) * 1.2;
    f.hr += (random() - 0.5) * 2;
    f.hr = Math.min(150, Math.max(45, f.hr));
    if (f.motionUntil < t && random() < 0.004) f.motionUntil = t + 30_000;
    const moving = t < f.motionUntil;
    const spo2 = Math.round(Math.min(100, Math.max(70, moving ? f.spo2 - 4 - random() * 6 : f.spo2)));
    out.push({
      at: new Date(t).toISOString(),
      spo2,
      heartRate: Math.round(f.hr),
      perfusionIndex: Math.round(f.pi * (moving ? 0.4 : 1) * 100) / 100,
      trace: moving ? 'noisy' : 'clean',
    });
    f.lastAt = t;
  }
  return out;
}

async function sendHttp(f: BedFeed, readings: Reading[]): Promise<Sent> {
  try {
    const res = await fetch(`${APP_URL}/api/ingest`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${f.route}` },
      body: JSON.stringify({ readings: readings.slice(-3600) }),
    });
    const body = (await res.json().catch(() => ({}))) as { stored?: number; error?: { message: string } };
    if (res.ok) return { stored: body.stored ?? 0 };
    return {
      stored: 0,
      failure: `bed ${f.bedLabel}: ${res.status} ${body.error?.message ?? ''}`,
      refused: res.status === 401,
    };
  } catch (err) {
    return { stored: 0, failure: `bed ${f.bedLabel}: ${(err as Error).message}` };
  }
}

const acks = { AA: 0, AE: 0, AR: 0, other: 0 };
let hl7: Hl7Client | null = null;
let controlSeq = 0;

/** Drops the connection after a failure, so the next message goes on a fresh one (the listener may have restarted). */
async function dropConnection(): Promise<void> {
  const old = hl7;
  hl7 = null;
  await old?.close().catch(() => {});
}

async function sendMllp(f: BedFeed, readings: Reading[]): Promise<Sent> {
  const recent = readings.slice(-3600);
  let stored = 0;
  for (let i = 0; i < recent.length; i += READINGS_PER_MESSAGE) {
    const msg = buildOru({
      application: GATEWAY.application,
      facility: GATEWAY.facility,
      controlId: `DEMO${Date.now()}${++controlSeq}`,
      bedName: f.route,
      sentAt: new Date(),
      // HL7 carries no trace word (the listener stores SpO₂ as clean), so a motion spell's SpO₂ is
      // withheld, as a gateway withholds an artefact-flagged value: the reading stays untrusted.
      readings: recent.slice(i, i + READINGS_PER_MESSAGE).map((r) => ({
        at: new Date(r.at),
        spo2: r.trace === 'clean' ? r.spo2 : null,
        heartRate: r.heartRate,
        perfusionIndex: r.perfusionIndex,
      })),
    });
    let ack: Hl7Message;
    try {
      hl7 ??= new Hl7Client({ host: MLLP_HOST, port: MLLP_PORT, connectTimeout: 5_000 });
      ack = await hl7.sendAndWait(msg, { returnAck: 'first', timeoutMs: ACK_TIMEOUT_MS });
    } catch (err) {
      await dropConnection();
      return {
        stored,
        failure: `bed ${f.bedLabel}: no ACK from ${MLLP_HOST}:${MLLP_PORT} (${(err as Error).message})`,
      };
    }
    const msa = ack.getSegment('MSA');
    const code = msa?.getField(1)?.toString() ?? '';
    const text = msa?.getField(3)?.toString() ?? '';
    if (code === 'AA' || code === 'AE' || code === 'AR') acks[code] += 1;
    else acks.other += 1;
    if (code !== 'AA') {
      // An unknown sender or an unmapped bed name: set up anew (re-register, re-map) rather than resend forever.
      const errCode = ack.getSegment('ERR')?.getComponent(3, 1) ?? '';
      const refused =
        errCode === HL7_ERROR.unknownKey[0] || ack.getSegment('ERR')?.getField(2)?.toString() === 'PV1^1^3';
      return { stored, failure: `bed ${f.bedLabel}: ${code || 'no MSA'} ${text}`, refused };
    }
    stored += Number(/^(\d+) stored/.exec(text)?.[1] ?? 0);
  }
  return { stored };
}

const send = VIA === 'mllp' ? sendMllp : sendHttp;
const ackCounts = () =>
  VIA === 'mllp'
    ? `; ACKs AA ${acks.AA}, AE ${acks.AE}, AR ${acks.AR}${acks.other ? `, other ${acks.other}` : ''}`
    : '';

interface CycleResult {
  stored: number;
  failures: string[];
  refused: boolean;
}

async function cycle(feeds: BedFeed[]): Promise<CycleResult> {
  const result: CycleResult = { stored: 0, failures: [], refused: false };
  for (const f of feeds) {
    const lastAt = f.lastAt;
    const state = { spo2: f.spo2, hr: f.hr, motionUntil: f.motionUntil };
    const readings = nextReadings(f, Date.now());
    if (readings.length === 0) continue;
    const sent = await send(f, readings);
    result.stored += sent.stored;
    if (sent.failure === undefined) continue;
    result.failures.push(sent.failure);
    if (sent.refused) result.refused = true;
    // Not (all) stored: play the same span again next cycle (what did go is skipped as a duplicate
    // by bed and time; a gap of hours is trimmed to the newest 3,600).
    Object.assign(f, state, { lastAt });
  }
  return result;
}

let stopping = false;
let wake: (() => void) | null = null;
const stop = () => {
  stopping = true;
  wake?.();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
/** Waits `ms` — a timer that holds the process open — or less when asked to stop. */
const pause = (ms: number) =>
  new Promise<void>((r) => {
    const t = setTimeout(() => {
      wake = null;
      r();
    }, ms);
    wake = () => {
      clearTimeout(t);
      wake = null;
      r();
    };
  });

async function setUpUntilReady(): Promise<BedFeed[] | null> {
  for (let attempt = 1; !stopping; attempt++) {
    try {
      return await setUp();
    } catch (err) {
      if (attempt === 1 || attempt % 20 === 0)
        log(`cannot set up (attempt ${attempt}), retrying every ${CYCLE_MS / 1000} s: ${(err as Error).message}`);
      await pause(CYCLE_MS);
    }
  }
  return null;
}

const way =
  VIA === 'mllp'
    ? `as HL7 v2 ORU^R01 over MLLP to ${MLLP_HOST}:${MLLP_PORT} (gateway ${GATEWAY.application}^${GATEWAY.facility})`
    : `through POST ${APP_URL}/api/ingest`;
let feeds = await setUpUntilReady();
if (feeds)
  log(
    `playing readings ${way} into ${feeds.length} beds (${feeds.map((f) => f.bedLabel).join(', ')}) every ${CYCLE_MS / 1000} s until Ctrl-C`,
  );
let cycles = 0;
let failingSince = 0;
let totalStored = 0;
while (feeds && !stopping) {
  const { stored, failures, refused } = await cycle(feeds);
  cycles += 1;
  totalStored += stored;
  if (failures.length) {
    failingSince += 1;
    if (failingSince === 1 || failingSince % 20 === 0)
      log(
        `cycle ${cycles}: ${failures.length} of ${feeds.length} beds failed (${failingSince} cycle(s) in a row): ${failures.slice(0, 3).join('; ')}${ackCounts()}`,
      );
  } else if (failingSince) {
    log(`cycle ${cycles}: recovered after ${failingSince} failing cycle(s); ${stored} readings stored${ackCounts()}`);
    failingSince = 0;
  } else if (cycles % 20 === 1) log(`cycle ${cycles}: ${stored} readings stored${ackCounts()}`);
  if (refused && !stopping) {
    log(VIA === 'mllp' ? 'gateway or bed name refused: setting up again' : 'keys refused: setting up again');
    feeds = await setUpUntilReady();
  }
  if (!stopping) await pause(CYCLE_MS);
}
await dropConnection();
log(`stopped: ${totalStored} readings stored in ${cycles} cycle(s)${ackCounts()}`);
await closeDb();
