import { seededRandom } from '~/lib/random.ts';
import { demoPatients, demoUnits, type DemoObservation, type DemoPatient } from './scenario.ts';

/**
 * Invented history for the demo units: 14 days of earlier patients in every bed (discharged before
 * today's patients came in), with hourly charted obs (full sets, the odd missed hour and poor trace),
 * a few below-band spells and the escalations they raised, claimed and closed. Kept light (hourly,
 * no per-minute device rows) so seeding stays quick; the last 48 h stay as scenario.ts makes them.
 * Every name and number is invented.
 */
export const HISTORY_DAYS = 14;

export interface PastPatient {
  mrn: string;
  givenName: string;
  familyName: string;
  dateOfBirth: string;
  co2RetentionRisk: boolean;
  unitCode: string;
  bedLabel: string;
  admittedAt: Date;
  dischargedAt: Date;
  band: { low: number; high: number; news2Scale: 1 | 2; preset: string; reason: string };
  device: DemoPatient['device'];
  fio2: number;
  flowLpm: number | null;
}
export interface PastEscalation {
  mrn: string;
  kind: 'below_band' | 'probe_check';
  severity: 'standard' | 'urgent' | null;
  raisedAt: Date;
  claimedAt: Date;
  closedAt: Date;
  outcome: 'treated_at_bedside' | 'reviewed_by_outreach' | 'reading_was_artefact';
  runStart: Date;
  runEnd: Date;
  lowest: number;
}
export interface DemoHistory {
  patients: PastPatient[];
  observations: DemoObservation[];
  escalations: PastEscalation[];
}

const GIVEN = [
  'Aldous',
  'Brigid',
  'Casimir',
  'Delphine',
  'Emrys',
  'Fenella',
  'Gwilym',
  'Hesper',
  'Ivo',
  'Jessamy',
  'Kit',
  'Lark',
  'Merrin',
  'Nye',
  'Orla',
  'Piran',
  'Rosamund',
  'Silas',
  'Tamsyn',
  'Ulric',
];
const FAMILY = [
  'Ashcombe',
  'Bramwell',
  'Coldridge',
  'Dunmore',
  'Eastwick',
  'Farrant',
  'Glanville',
  'Hartop',
  'Inchbald',
  'Jellicoe',
  'Kestle',
  'Lanyon',
  'Moyle',
  'Nancarrow',
  'Ottery',
  'Pendarves',
  'Quiller',
  'Rosewarne',
  'Sennen',
  'Trebilcock',
];
const BANDS = [
  { low: 92, high: 96, news2Scale: 1 as const, preset: 'tsanz-2015', reason: 'Standard ICU target on admission' },
  { low: 94, high: 98, news2Scale: 1 as const, preset: 'bts-2017', reason: 'Acutely unwell, no CO2 retention risk' },
  {
    low: 88,
    high: 92,
    news2Scale: 2 as const,
    preset: 'bts-2017-hypercapnic',
    reason: 'Known CO2 retainer (COPD), bicarbonate raised',
  },
];
const DEVICES: { device: DemoPatient['device']; fio2: number; flowLpm: number | null; estimated: boolean }[] = [
  { device: 'nasal_cannula', fio2: 0.28, flowLpm: 2, estimated: true },
  { device: 'simple_mask', fio2: 0.4, flowLpm: 6, estimated: true },
  { device: 'high_flow_nasal', fio2: 0.45, flowLpm: 40, estimated: false },
  { device: 'ventilator', fio2: 0.35, flowLpm: null, estimated: false },
  { device: 'room_air', fio2: 0.21, flowLpm: null, estimated: false },
];

const HOUR = 3_600_000;

export function generateDemoHistory(now: Date, seed = 20261203): DemoHistory {
  const rand = seededRandom(seed);
  const nowHour = Math.floor(now.getTime() / HOUR) * HOUR;
  const start = nowHour - HISTORY_DAYS * 24 * HOUR;
  const patients: PastPatient[] = [];
  const observations: DemoObservation[] = [];
  const escalations: PastEscalation[] = [];
  let serial = 0;
  for (const unit of demoUnits) {
    for (const bedLabel of unit.beds) {
      const current = demoPatients.find((p) => p.bedLabel === bedLabel);
      // The bed is free for history until a few hours before today's patient came (or 2 days ago, for an empty bed).
      const freeUntil = nowHour - ((current ? current.admittedHoursAgo : 48) + 3) * HOUR;
      let t = start - Math.floor(rand() * 48) * HOUR;
      while (true) {
        const los = (36 + Math.floor(rand() * 84)) * HOUR; // 1.5–5 days
        const admittedAt = t;
        let dischargedAt = Math.min(admittedAt + los, freeUntil);
        if (dischargedAt - Math.max(admittedAt, start) < 12 * HOUR) break;
        serial++;
        const band = BANDS[Math.floor(rand() * BANDS.length)]!;
        const dev = DEVICES[Math.floor(rand() * DEVICES.length)]!;
        const pt: PastPatient = {
          mrn: `HV${String(700000 + serial * 37).padStart(6, '0')}`,
          givenName: GIVEN[(serial * 7) % GIVEN.length]!,
          familyName: FAMILY[(serial * 11 + 3) % FAMILY.length]!,
          dateOfBirth: `${1940 + Math.floor(rand() * 55)}-${String(1 + Math.floor(rand() * 12)).padStart(2, '0')}-${String(1 + Math.floor(rand() * 28)).padStart(2, '0')}`,
          co2RetentionRisk: band.low === 88,
          unitCode: unit.code,
          bedLabel,
          admittedAt: new Date(admittedAt),
          dischargedAt: new Date(dischargedAt),
          band,
          device: dev.device,
          fio2: dev.fio2,
          flowLpm: dev.flowLpm,
        };
        patients.push(pt);
        const mid = Math.round((band.low + band.high) / 2);
        // One below-band spell in about half the stays, and a poor-trace spell in a third.
        const dipAt =
          rand() < 0.5
            ? admittedAt + (6 + Math.floor(rand() * ((dischargedAt - admittedAt) / HOUR - 12))) * HOUR
            : null;
        const dipHours = 2 + Math.floor(rand() * 3);
        const poorAt =
          rand() < 0.33
            ? admittedAt + (3 + Math.floor(rand() * ((dischargedAt - admittedAt) / HOUR - 6))) * HOUR
            : null;
        let dipLowest = 100;
        for (let h = admittedAt + 20 * 60_000; h < dischargedAt; h += HOUR) {
          if (rand() < 0.04) h += HOUR; // a missed hour: the obs run late
          if (h >= dischargedAt) break;
          let spo2 = mid + Math.round((rand() - 0.5) * 4);
          let trace: DemoObservation['trace'] = rand() < 0.05 ? 'weak' : 'clean';
          if (dipAt !== null && h >= dipAt && h < dipAt + dipHours * HOUR) {
            spo2 = band.low - 1 - Math.floor(rand() * (rand() < 0.3 ? 6 : 3));
            dipLowest = Math.min(dipLowest, spo2);
          }
          if (poorAt !== null && h >= poorAt && h < poorAt + HOUR) {
            spo2 = 80 + Math.floor(rand() * 8);
            trace = 'noisy';
          }
          const hr = Math.round(80 + (rand() - 0.5) * 18 + (spo2 < band.low ? 14 : 0));
          observations.push({
            mrn: pt.mrn,
            takenAt: new Date(h),
            source: 'charted',
            spo2,
            heartRate: hr,
            respRate: Math.round(17 + (rand() - 0.5) * 6 + (spo2 < band.low ? 6 : 0)),
            fio2: dev.fio2,
            fio2Estimated: dev.estimated,
            device: dev.device,
            flowLpm: dev.flowLpm,
            trace,
            perfusionIndex:
              trace === 'clean' ? Math.round((1.2 + rand() * 3) * 100) / 100 : trace === 'weak' ? 0.6 : 0.2,
            systolic: Math.round(118 + (rand() - 0.5) * 26),
            temperature: Math.round((36.8 + (rand() - 0.5) * 1.4) * 10) / 10,
            consciousness: 'alert',
            probeSite: 'finger',
          });
        }
        if (dipAt !== null && dipAt + 2 * HOUR < dischargedAt) {
          const raisedAt = dipAt + HOUR + 20 * 60_000 + 60_000; // the second low charted obs in a row
          const claimedAt = raisedAt + (3 + Math.floor(rand() * 25)) * 60_000;
          const closedAt = claimedAt + (15 + Math.floor(rand() * 90)) * 60_000;
          escalations.push({
            mrn: pt.mrn,
            kind: 'below_band',
            severity: dipLowest <= band.low - 5 || dipLowest < 85 ? 'urgent' : 'standard',
            raisedAt: new Date(raisedAt),
            claimedAt: new Date(claimedAt),
            closedAt: new Date(closedAt),
            outcome: rand() < 0.6 ? 'treated_at_bedside' : 'reviewed_by_outreach',
            runStart: new Date(dipAt + 20 * 60_000),
            runEnd: new Date(raisedAt - 60_000),
            lowest: dipLowest,
          });
        }
        if (poorAt !== null && poorAt + 2 * HOUR < dischargedAt) {
          const raisedAt = poorAt + 20 * 60_000 + 15 * 60_000;
          const claimedAt = raisedAt + (2 + Math.floor(rand() * 12)) * 60_000;
          escalations.push({
            mrn: pt.mrn,
            kind: 'probe_check',
            severity: null,
            raisedAt: new Date(raisedAt),
            claimedAt: new Date(claimedAt),
            closedAt: new Date(claimedAt + (5 + Math.floor(rand() * 20)) * 60_000),
            outcome: 'reading_was_artefact',
            runStart: new Date(poorAt + 20 * 60_000),
            runEnd: new Date(raisedAt - 60_000),
            lowest: 80,
          });
        }
        dischargedAt = pt.dischargedAt.getTime();
        t = dischargedAt + (2 + Math.floor(rand() * 10)) * HOUR; // cleaning and turnaround
        if (t >= freeUntil - 12 * HOUR) break;
      }
    }
  }
  observations.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
  return { patients, observations, escalations };
}
