/**
 * Demo feeder: plays invented bedside-monitor readings into the demo beds through POST /api/ingest,
 * as a gateway would, so the ward board lives. Started by start.sh (EBB_FEEDER=off skips it).
 *
 * It makes one device key per monitored demo bed at start (audited, actor "system"), revoking the
 * keys of its previous run; the keys stay in this process's memory and are never printed.
 * Each bed carries on from its patient's latest device readings (a desaturating patient stays low).
 */
import { createDeviceKey, revokeKey } from '../src/lib/server/devices/keys.ts';
import { closeDb, db } from '../src/lib/server/queries/db.ts';
import { liveKeyIdsLabelled, occupiedBedsWithDeviceReadings, recentDeviceReadings } from './feeder-queries.ts';

const APP_URL = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 4321}`;
const LABEL = 'demo feeder';
const STEP_MS = 5_000;
const CYCLE_MS = 15_000;
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

async function cycle(feeds: BedFeed[]) {
  let stored = 0;
  for (const f of feeds) {
    const readings = nextReadings(f, Date.now());
    if (readings.length === 0) continue;
    try {
      const res = await fetch(`${APP_URL}/api/ingest`, {
        method: 'POST', headers: { 'content-type': 'application/json', authorization: `Bearer ${f.key}` }, body: JSON.stringify({ readings: readings.slice(-3600) }),
      });
      const body = (await res.json()) as { stored?: number; error?: { message: string } };
      if (!res.ok) log(`bed ${f.bedLabel}: ${res.status} ${body.error?.message ?? ''}`);
      else stored += body.stored ?? 0;
    } catch (err) {
      log(`bed ${f.bedLabel}: ${(err as Error).message}`);
    }
  }
  return stored;
}

let stopping = false;
const stop = () => { stopping = true; };
process.on('SIGTERM', stop);
process.on('SIGINT', stop);

const feeds = await setUp();
log(`playing readings into ${feeds.length} beds (${feeds.map((f) => f.bedLabel).join(', ')}) every ${CYCLE_MS / 1000} s`);
let cycles = 0;
while (!stopping) {
  const stored = await cycle(feeds);
  if (++cycles % 20 === 1) log(`cycle ${cycles}: ${stored} readings stored`);
  await new Promise((r) => setTimeout(r, CYCLE_MS).unref());
  if (stopping) break;
}
await closeDb();
