/**
 * Demo feeder: plays invented bedside-monitor readings into the demo beds through POST /api/ingest,
 * as a gateway would, so the ward board lives. Started by start.sh (EBB_FEEDER=off skips it).
 * EBB_FEEDER_VIA=mllp plays the same readings as HL7 v2 ORU^R01 through the MLLP listener instead
 * (EBB_MLLP_PORT), as a registered gateway "EBBDEMO^HARBOURSIDE" with one bed name per demo bed.
 *
 * It makes one device key per monitored demo bed at start (audited, actor "system"), revoking the
 * keys of its previous run; the keys stay in this process's memory and are never printed.
 * Each bed carries on from its patient's latest device readings (a desaturating patient stays low).
 */
import { Hl7Client } from '@medplum/hl7';
import { createDeviceKey, revokeKey } from '../src/lib/server/devices/keys.ts';
import { buildOru } from '../src/lib/hl7/oru.ts';
import { createGateway, mapGatewayBed, revokeGatewayById } from '../src/lib/server/hl7/gateways.ts';
import { liveGatewayBySender } from '../src/lib/server/queries/hl7-gateways.ts';
import { closeDb, db } from '../src/lib/server/queries/db.ts';
import { liveKeyIdsLabelled, occupiedBedsWithDeviceReadings, recentDeviceReadings } from './feeder-queries.ts';

const APP_URL = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 4321}`;
const LABEL = 'demo feeder';
const STEP_MS = 5_000;
const CYCLE_MS = 15_000;
const UNITS = (process.env.EBB_FEEDER_UNITS ?? 'L4ICU,L5HDU').split(',');
const VIA_MLLP = process.env.EBB_FEEDER_VIA === 'mllp';
const GW_APP = 'EBBDEMO';
const GW_FACILITY = 'HARBOURSIDE';
let hl7: Hl7Client | null = null;
let controlSeq = 0;

interface BedFeed { bedLabel: string; bedName: string; key: string; level: number; spo2: number; hr: number; pi: number; lastAt: number; motionUntil: number }

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
  let gatewayId: number | null = null;
  if (VIA_MLLP) {
    // A fresh demo gateway per run (the last run's is revoked, audited), its bed names mapped to the beds.
    const old = await liveGatewayBySender(GW_APP, GW_FACILITY);
    if (old) await revokeGatewayById(null, old.id, 'demo feeder restarted');
    gatewayId = (await createGateway(null, { label: LABEL, sendingApplication: GW_APP, sendingFacility: GW_FACILITY })).id;
    hl7 = new Hl7Client({ host: process.env.EBB_MLLP_HOST ?? '127.0.0.1', port: Number(process.env.EBB_MLLP_PORT ?? 2575) });
  }
  for (const bed of beds) {
    const bedName = `DEMO^^${bed.bed_label}`;
    if (gatewayId !== null) await mapGatewayBed(null, gatewayId, { bedName, bedId: bed.bed_id });
    const recent = await recentDeviceReadings(bed.patient_id, 10);
    const spo2s = recent.map((r) => r.spo2).filter((v): v is number => v !== null);
    const level = spo2s.length ? spo2s.reduce((a, b) => a + b, 0) / spo2s.length : 95;
    const hrs = recent.map((r) => r.heart_rate).filter((v): v is number => v !== null);
    const key = VIA_MLLP ? '' : (await createDeviceKey(null, { bedId: bed.bed_id, label: LABEL })).key;
    const last = recent[0] ? new Date(recent[0].taken_at).getTime() : Date.now() - 60_000;
    feeds.push({
      bedLabel: bed.bed_label, bedName, key, level, spo2: level, hr: hrs.length ? hrs[0]! : 80, pi: Number(recent[0]?.perfusion_index ?? 2) || 2,
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
    if (hl7) {
      try {
        // One ORU^R01 per bed per cycle; an hour at most (the feed's own limit applies the same way).
        const msg = buildOru({
          application: GW_APP, facility: GW_FACILITY, controlId: `DEMO${Date.now()}${++controlSeq}`, bedName: f.bedName, sentAt: new Date(),
          readings: readings.slice(-720).map((r) => ({ at: new Date(r.at), spo2: r.spo2, heartRate: r.heartRate, perfusionIndex: r.perfusionIndex })),
        });
        const ack = await hl7.sendAndWait(msg, { returnAck: 'first', timeoutMs: 15_000 });
        const msa = ack.getSegment('MSA');
        if (msa?.getField(1).toString() !== 'AA') log(`bed ${f.bedLabel}: ${msa?.getField(1).toString()} ${msa?.getField(3).toString()}`);
        else stored += Number(/^(\d+) stored/.exec(msa.getField(3).toString())?.[1] ?? 0);
      } catch (err) {
        log(`bed ${f.bedLabel}: ${(err as Error).message}`);
      }
      continue;
    }
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
log(`playing readings ${VIA_MLLP ? 'as HL7 v2 over MLLP' : 'through POST /api/ingest'} into ${feeds.length} beds (${feeds.map((f) => f.bedLabel).join(', ')}) every ${CYCLE_MS / 1000} s`);
let cycles = 0;
while (!stopping) {
  const stored = await cycle(feeds);
  if (++cycles % 20 === 1) log(`cycle ${cycles}: ${stored} readings stored`);
  await new Promise((r) => setTimeout(r, CYCLE_MS).unref());
  if (stopping) break;
}
await (hl7 as Hl7Client | null)?.close();
await closeDb();
