/**
 * Demo feeder: plays invented bedside-monitor readings into the demo beds through POST /api/ingest,
 * as a gateway would, so the ward board lives. Started by start.sh (EBB_FEEDER=off skips it).
 *
 * It makes one device key per monitored demo bed at start (audited, actor "system"), revoking the
 * keys of its previous run; the keys stay in this process's memory and are never printed.
 * Each bed carries on from its patient's latest device readings (a desaturating patient stays low).
 *
 * It plays until Ctrl-C (SIGINT/SIGTERM): its wait timer holds the process open (an unref'd timer
 * let Node exit after the first cycle once the database pool was idle). Failures are reported —
 * the first of a run and then every 20th — and it recovers by itself: when the database is down at
 * start it retries the set-up, when the app is away the readings of the missed cycles are sent
 * once it answers again, and when its keys are refused (another feeder took over) it sets up anew.
 */
import { createDeviceKey, revokeKey } from '../src/lib/server/devices/keys.ts';
import { closeDb, db } from '../src/lib/server/queries/db.ts';
import { liveKeyIdsLabelled, occupiedBedsWithDeviceReadings, recentDeviceReadings } from './feeder-queries.ts';

const APP_URL = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 4321}`;
const LABEL = 'demo feeder';
const STEP_MS = 5_000;
const CYCLE_MS = Number(process.env.EBB_FEEDER_CYCLE_MS ?? 15_000);
const UNITS = (process.env.EBB_FEEDER_UNITS ?? 'L4ICU,L5HDU').split(',');

interface BedFeed { bedLabel: string; key: string; level: number; spo2: number; hr: number; pi: number; lastAt: number; motionUntil: number }

const log = (msg: string) => console.log(`[feeder] ${msg}`);
let rand = 0x2f6b1d;
const random = () => {
  rand ^= rand << 13; rand >>>= 0; rand ^= rand >>> 17; rand ^= rand << 5; rand >>>= 0;
  return rand / 4294967296;
};

async function setUp(): Promise<BedFeed[]> {
  for (const id of await liveKeyIdsLabelled(db(), LABEL)) await revokeKey(null, id, 'demo feeder restarted');
  const beds = await occupiedBedsWithDeviceReadings(UNITS);
  const feeds: BedFeed[] = [];
  for (const bed of beds) {
    const recent = await recentDeviceReadings(bed.patient_id, 10);
    const spo2s = recent.map((r) => r.spo2).filter((v): v is number => v !== null);
    const level = spo2s.length ? spo2s.reduce((a, b) => a + b, 0) / spo2s.length : 95;
    const hrs = recent.map((r) => r.heart_rate).filter((v): v is number => v !== null);
    const { key } = await createDeviceKey(null, { bedId: bed.bed_id, label: LABEL });
    const last = recent[0] ? new Date(recent[0].taken_at).getTime() : Date.now() - 60_000;
    feeds.push({
      bedLabel: bed.bed_label, key, level, spo2: level, hr: hrs.length ? hrs[0]! : 80, pi: Number(recent[0]?.perfusion_index ?? 2) || 2,
      lastAt: Math.max(last, Date.now() - 10 * 60_000), motionUntil: 0,
    });
  }
  return feeds;
}

function nextReadings(f: BedFeed, until: number) {
  const out = [];
  for (let t = Math.floor(f.lastAt / STEP_MS) * STEP_MS + STEP_MS; t <= until; t += STEP_MS) {
    // Mean-reverting walk around the patient's own level; now and then a short spell of movement.
    f.spo2 += (f.level - f.spo2) * 0.1 + (random() - 0.5) * 1.2;
    f.hr += (random() - 0.5) * 2;
    f.hr = Math.min(150, Math.max(45, f.hr));
    if (f.motionUntil < t && random() < 0.004) f.motionUntil = t + 30_000;
    const moving = t < f.motionUntil;
    const spo2 = Math.round(Math.min(100, Math.max(70, moving ? f.spo2 - 4 - random() * 6 : f.spo2)));
    out.push({ at: new Date(t).toISOString(), spo2, heartRate: Math.round(f.hr), perfusionIndex: Math.round(f.pi * (moving ? 0.4 : 1) * 100) / 100, trace: moving ? 'noisy' : 'clean' });
    f.lastAt = t;
  }
  return out;
}

interface CycleResult { stored: number; failures: string[]; keysRefused: boolean }

async function cycle(feeds: BedFeed[]): Promise<CycleResult> {
  const result: CycleResult = { stored: 0, failures: [], keysRefused: false };
  for (const f of feeds) {
    const lastAt = f.lastAt;
    const state = { spo2: f.spo2, hr: f.hr, motionUntil: f.motionUntil };
    const readings = nextReadings(f, Date.now());
    if (readings.length === 0) continue;
    try {
      const res = await fetch(`${APP_URL}/api/ingest`, {
        method: 'POST', headers: { 'content-type': 'application/json', authorization: `Bearer ${f.key}` }, body: JSON.stringify({ readings: readings.slice(-3600) }),
      });
      const body = (await res.json().catch(() => ({}))) as { stored?: number; error?: { message: string } };
      if (res.ok) { result.stored += body.stored ?? 0; continue; }
      result.failures.push(`bed ${f.bedLabel}: ${res.status} ${body.error?.message ?? ''}`);
      if (res.status === 401) result.keysRefused = true;
    } catch (err) {
      result.failures.push(`bed ${f.bedLabel}: ${(err as Error).message}`);
    }
    // Not stored: play the same span again next cycle (a gap of hours is trimmed to the newest 3,600).
    Object.assign(f, state, { lastAt });
  }
  return result;
}

let stopping = false;
let wake: (() => void) | null = null;
const stop = () => { stopping = true; wake?.(); };
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
/** Waits `ms` — a timer that holds the process open — or less when asked to stop. */
const pause = (ms: number) => new Promise<void>((r) => {
  const t = setTimeout(() => { wake = null; r(); }, ms);
  wake = () => { clearTimeout(t); wake = null; r(); };
});

async function setUpUntilReady(): Promise<BedFeed[] | null> {
  for (let attempt = 1; !stopping; attempt++) {
    try {
      return await setUp();
    } catch (err) {
      if (attempt === 1 || attempt % 20 === 0) log(`cannot set up (attempt ${attempt}), retrying every ${CYCLE_MS / 1000} s: ${(err as Error).message}`);
      await pause(CYCLE_MS);
    }
  }
  return null;
}

let feeds = await setUpUntilReady();
if (feeds) log(`playing readings into ${feeds.length} beds (${feeds.map((f) => f.bedLabel).join(', ')}) every ${CYCLE_MS / 1000} s until Ctrl-C`);
let cycles = 0;
let failingSince = 0;
while (feeds && !stopping) {
  const { stored, failures, keysRefused } = await cycle(feeds);
  cycles += 1;
  if (failures.length) {
    failingSince += 1;
    if (failingSince === 1 || failingSince % 20 === 0) log(`cycle ${cycles}: ${failures.length} of ${feeds.length} beds failed (${failingSince} cycle(s) in a row): ${failures.slice(0, 3).join('; ')}`);
  } else if (failingSince) {
    log(`cycle ${cycles}: recovered after ${failingSince} failing cycle(s); ${stored} readings stored`);
    failingSince = 0;
  } else if (cycles % 20 === 1) log(`cycle ${cycles}: ${stored} readings stored`);
  if (keysRefused && !stopping) {
    log('keys refused: setting up again');
    feeds = await setUpUntilReady();
  }
  if (!stopping) await pause(CYCLE_MS);
}
log('stopped');
await closeDb();
