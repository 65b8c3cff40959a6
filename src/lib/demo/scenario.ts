import { seededRandom } from '~/lib/random.ts';

/**
 * The invented demo hospital, "Harbourside General": units, beds, staff, patients and 48 h of
 * generated obs. Pure and deterministic (seeded random numbers) so the seed and its tests agree.
 * Every person and number here is invented for the demo; none is clinical guidance.
 */

export type DemoRole = 'nurse' | 'charge' | 'intensivist' | 'outreach' | 'admin';
export type DemoStory =
  | 'steady'
  | 'desaturating' // a real, trusted fall below band over the last ~40 min
  | 'motion' // poor traces now and in an earlier episode: cannot verify
  | 'above_on_oxygen' // 88–92 band, reading 96–98 on FiO2 0.35
  | 'overdue' // last charted obs well past the overdue limit
  | 'no_band'; // just admitted, no target ordered yet

export interface DemoUnit {
  code: string;
  name: string;
  timeZone: string;
  beds: string[];
}
export interface DemoUser {
  email: string;
  name: string;
  role: DemoRole;
  unitCode: string | null;
}
export interface DemoPatient {
  mrn: string;
  givenName: string;
  familyName: string;
  dateOfBirth: string;
  co2RetentionRisk: boolean;
  unitCode: string;
  bedLabel: string;
  admittedHoursAgo: number;
  story: DemoStory;
  band: { low: number; high: number; news2Scale: 1 | 2; preset: string; reason: string } | null;
  device: 'room_air' | 'nasal_cannula' | 'simple_mask' | 'high_flow_nasal' | 'niv' | 'ventilator';
  fio2: number;
  flowLpm: number | null;
  monitored: boolean;
}
export interface DemoObservation {
  mrn: string;
  takenAt: Date;
  source: 'charted' | 'device';
  spo2: number;
  heartRate: number;
  respRate: number | null;
  fio2: number;
  fio2Estimated: boolean;
  device: DemoPatient['device'];
  flowLpm: number | null;
  trace: 'clean' | 'weak' | 'noisy' | 'absent';
  perfusionIndex: number | null;
  systolic: number | null;
  temperature: number | null;
  consciousness: 'alert' | null;
  probeSite: string | null;
}

export const DEMO_PASSWORD = 'ebbwatch-demo';
export const DEMO_HOSPITAL = 'Harbourside General';

export const demoUnits: DemoUnit[] = [
  { code: 'L4ICU', name: 'Level 4 ICU', timeZone: 'Europe/London', beds: range(12).map((i) => `4-${pad(i + 1)}`) },
  { code: 'L5HDU', name: 'Level 5 HDU', timeZone: 'Europe/London', beds: range(8).map((i) => `5-${pad(i + 1)}`) },
];

export const demoUsers: DemoUser[] = [
  { email: 'nurse@harbourside.example', name: 'Tamsin Orrell', role: 'nurse', unitCode: 'L4ICU' },
  { email: 'charge@harbourside.example', name: 'Bram Keverne', role: 'charge', unitCode: 'L4ICU' },
  { email: 'intensivist@harbourside.example', name: 'Dr Ines Maridew', role: 'intensivist', unitCode: null },
  { email: 'outreach@harbourside.example', name: 'Kofi Ashgrove', role: 'outreach', unitCode: null },
  { email: 'admin@harbourside.example', name: 'Perrin Falloway', role: 'admin', unitCode: null },
  { email: 'nurse5@harbourside.example', name: 'Lowri Tenbury', role: 'nurse', unitCode: 'L5HDU' },
  { email: 'charge5@harbourside.example', name: 'Odile Brackwater', role: 'charge', unitCode: 'L5HDU' },
];

const standard = {
  low: 92,
  high: 96,
  news2Scale: 1 as const,
  preset: 'tsanz-2015',
  reason: 'Standard ICU target on admission',
};
const btsStandard = {
  low: 94,
  high: 98,
  news2Scale: 1 as const,
  preset: 'bts-2017',
  reason: 'Acutely unwell, no CO2 retention risk',
};
const retainer = {
  low: 88,
  high: 92,
  news2Scale: 2 as const,
  preset: 'bts-2017-hypercapnic',
  reason: 'Known CO2 retainer (COPD), bicarbonate raised',
};

export const demoPatients: DemoPatient[] = [
  p(
    'HG400117',
    'Maren',
    'Quillfeather',
    '1958-03-14',
    false,
    'L4ICU',
    '4-01',
    40,
    'desaturating',
    standard,
    'high_flow_nasal',
    0.5,
    50,
    true,
  ),
  p(
    'HG400233',
    'Edwin',
    'Salterby',
    '1949-11-02',
    true,
    'L4ICU',
    '4-02',
    46,
    'above_on_oxygen',
    retainer,
    'nasal_cannula',
    0.32,
    3,
    true,
  ),
  p(
    'HG400351',
    'Priya',
    'Vantongeren',
    '1971-07-21',
    false,
    'L4ICU',
    '4-03',
    30,
    'motion',
    standard,
    'simple_mask',
    0.4,
    6,
    true,
  ),
  p(
    'HG400468',
    'Colm',
    'Ardagh-Pike',
    '1983-01-09',
    false,
    'L4ICU',
    '4-04',
    48,
    'steady',
    standard,
    'ventilator',
    0.35,
    null,
    true,
  ),
  p(
    'HG400572',
    'Ysolde',
    'Marchbank',
    '1966-05-30',
    false,
    'L4ICU',
    '4-05',
    44,
    'overdue',
    btsStandard,
    'nasal_cannula',
    0.28,
    2,
    true,
  ),
  p(
    'HG400689',
    'Teodor',
    'Lisle',
    '1990-09-17',
    false,
    'L4ICU',
    '4-06',
    20,
    'steady',
    btsStandard,
    'room_air',
    0.21,
    null,
    true,
  ),
  p(
    'HG400795',
    'Annick',
    'Fenwright',
    '1954-12-25',
    false,
    'L4ICU',
    '4-08',
    36,
    'steady',
    standard,
    'niv',
    0.45,
    null,
    true,
  ),
  p(
    'HG400814',
    'Rufus',
    'Hollowell',
    '1977-04-03',
    false,
    'L4ICU',
    '4-09',
    2,
    'no_band',
    null,
    'nasal_cannula',
    0.28,
    2,
    true,
  ),
  p(
    'HG400926',
    'Saoirse',
    'Penhallow',
    '1962-08-11',
    true,
    'L4ICU',
    '4-11',
    48,
    'steady',
    retainer,
    'nasal_cannula',
    0.28,
    2,
    true,
  ),
  p(
    'HG500142',
    'Gideon',
    'Threlfall',
    '1945-02-19',
    false,
    'L5HDU',
    '5-01',
    48,
    'steady',
    btsStandard,
    'room_air',
    0.21,
    null,
    false,
  ),
  p(
    'HG500257',
    'Ottilie',
    'Brennock',
    '1969-10-06',
    false,
    'L5HDU',
    '5-02',
    40,
    'overdue',
    standard,
    'nasal_cannula',
    0.28,
    2,
    false,
  ),
  p(
    'HG500363',
    'Lazlo',
    'Umberfield',
    '1987-06-28',
    false,
    'L5HDU',
    '5-04',
    30,
    'desaturating',
    btsStandard,
    'simple_mask',
    0.4,
    6,
    false,
  ),
  p(
    'HG500478',
    'Wenna',
    'Carrow',
    '1952-03-31',
    true,
    'L5HDU',
    '5-05',
    48,
    'above_on_oxygen',
    retainer,
    'nasal_cannula',
    0.36,
    4,
    false,
  ),
  p(
    'HG500584',
    'Hamish',
    'Oakenshaw',
    '1974-12-12',
    false,
    'L5HDU',
    '5-07',
    24,
    'steady',
    standard,
    'room_air',
    0.21,
    null,
    false,
  ),
];

/** Obs for every demo patient from admission (at most 48 h) to `now`: hourly charted, per-minute device. */
export function generateDemoObservations(now: Date, seed = 20261202): DemoObservation[] {
  const rand = seededRandom(seed);
  const out: DemoObservation[] = [];
  const nowMs = Math.floor(now.getTime() / 60_000) * 60_000;
  for (const pt of demoPatients) {
    const start = nowMs - Math.min(pt.admittedHoursAgo, 48) * 3_600_000;
    const mid = pt.band ? (pt.band.low + pt.band.high) / 2 : 95;
    const lastChartedAgoMin = pt.story === 'overdue' ? 130 : 25 + Math.floor(rand() * 20);
    // Hourly charted obs, ending lastChartedAgoMin before now.
    for (let t = nowMs - lastChartedAgoMin * 60_000; t >= start; t -= 3_600_000) {
      const minsAgo = (nowMs - t) / 60_000;
      const spo2 = storySpo2(pt, mid, minsAgo, rand, 'charted');
      out.push(obs(pt, t, 'charted', spo2.value, spo2.trace, rand, true));
    }
    // The desaturating patient also has a fresh charted obs below band, so the story shows on hourly-only units.
    if (pt.story === 'desaturating') {
      for (const minsAgo of [18, 6]) {
        out.push(
          obs(pt, nowMs - minsAgo * 60_000, 'charted', pt.band!.low - (minsAgo === 6 ? 5 : 3), 'clean', rand, true),
        );
      }
    }
    if (!pt.monitored) continue;
    for (let t = start; t <= nowMs; t += 60_000) {
      const minsAgo = (nowMs - t) / 60_000;
      const spo2 = storySpo2(pt, mid, minsAgo, rand, 'device');
      out.push(obs(pt, t, 'device', spo2.value, spo2.trace, rand, false));
    }
  }
  return out.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
}

function storySpo2(pt: DemoPatient, mid: number, minsAgo: number, rand: () => number, source: 'charted' | 'device') {
  const jitter = Math.round((rand() - 0.5) * (source === 'device' ? 3 : 2));
  let value = Math.round(mid) + jitter;
  let trace: DemoObservation['trace'] = rand() < 0.08 ? 'weak' : 'clean';
  switch (pt.story) {
    case 'desaturating':
      if (minsAgo <= 40) value = pt.band!.low - 2 - Math.round((40 - minsAgo) / 10) + jitter;
      break;
    case 'motion':
      // Two poor-trace episodes: one 9 h ago (resolved) and one running for the last 25 min.
      if ((minsAgo >= 540 && minsAgo <= 575) || minsAgo <= 25) {
        value = 78 + Math.round(rand() * 12);
        trace = rand() < 0.7 ? 'noisy' : 'absent';
      }
      break;
    case 'above_on_oxygen':
      if (minsAgo <= 150) value = 96 + Math.round(rand() * 2);
      break;
    default:
      break;
  }
  return { value: Math.max(60, Math.min(100, value)), trace };
}

function obs(
  pt: DemoPatient,
  t: number,
  source: 'charted' | 'device',
  spo2: number,
  trace: DemoObservation['trace'],
  rand: () => number,
  full: boolean,
): DemoObservation {
  const hr = Math.round(78 + (rand() - 0.5) * 16 + (spo2 < 90 ? 18 : 0));
  return {
    mrn: pt.mrn,
    takenAt: new Date(t),
    source,
    spo2,
    heartRate: hr,
    respRate: full ? Math.round(17 + (rand() - 0.5) * 6 + (spo2 < 90 ? 7 : 0)) : null,
    fio2: pt.fio2,
    fio2Estimated: pt.device === 'nasal_cannula' || pt.device === 'simple_mask',
    device: pt.device,
    flowLpm: pt.flowLpm,
    trace,
    perfusionIndex: trace === 'clean' ? Math.round((1.2 + rand() * 3) * 100) / 100 : trace === 'weak' ? 0.6 : 0.2,
    systolic: full ? Math.round(118 + (rand() - 0.5) * 24) : null,
    temperature: full ? Math.round((36.8 + (rand() - 0.5) * 1.2) * 10) / 10 : null,
    consciousness: full ? 'alert' : null,
    probeSite: full ? 'finger' : null,
  };
}

function p(
  mrn: string,
  givenName: string,
  familyName: string,
  dateOfBirth: string,
  co2RetentionRisk: boolean,
  unitCode: string,
  bedLabel: string,
  admittedHoursAgo: number,
  story: DemoStory,
  band: DemoPatient['band'],
  device: DemoPatient['device'],
  fio2: number,
  flowLpm: number | null,
  monitored: boolean,
): DemoPatient {
  return {
    mrn,
    givenName,
    familyName,
    dateOfBirth,
    co2RetentionRisk,
    unitCode,
    bedLabel,
    admittedHoursAgo,
    story,
    band,
    device,
    fio2,
    flowLpm,
    monitored,
  };
}

function range(n: number) {
  return Array.from({ length: n }, (_, i) => i);
}
function pad(n: number) {
  return String(n).padStart(2, '0');
}

export interface DemoBloodGas {
  mrn: string;
  hoursAgo: number;
  sampleType: 'arterial' | 'venous' | 'capillary';
  ph: number;
  pao2Kpa: number;
  paco2Kpa: number;
  sao2: number;
  hco3: number;
  baseExcess: number;
  lactate: number;
  hbGdl: number;
  fio2: number;
  spo2AtSample: number;
}

/**
 * A few invented blood gases. Bed 4-04 has a pair where the oximeter over-reads: SaO₂ 86.5 %
 * measured while SpO₂ read 93 % (occult hypoxaemia, as Sjoding 2020 defined it), after an earlier
 * pair 4 points apart. Bed 4-02 (a CO₂ retainer on Scale 2) has a hypercapnic gas.
 */
export const demoBloodGases: DemoBloodGas[] = [
  {
    mrn: 'HG400468',
    hoursAgo: 9,
    sampleType: 'arterial',
    ph: 7.39,
    pao2Kpa: 8.6,
    paco2Kpa: 5.2,
    sao2: 91,
    hco3: 23.4,
    baseExcess: -0.8,
    lactate: 1.1,
    hbGdl: 11.9,
    fio2: 0.35,
    spo2AtSample: 95,
  },
  {
    mrn: 'HG400468',
    hoursAgo: 3,
    sampleType: 'arterial',
    ph: 7.37,
    pao2Kpa: 7.1,
    paco2Kpa: 5.4,
    sao2: 86.5,
    hco3: 23.1,
    baseExcess: -1.4,
    lactate: 1.3,
    hbGdl: 11.8,
    fio2: 0.35,
    spo2AtSample: 93,
  },
  {
    mrn: 'HG400233',
    hoursAgo: 5,
    sampleType: 'arterial',
    ph: 7.33,
    pao2Kpa: 8.2,
    paco2Kpa: 7.6,
    sao2: 91.5,
    hco3: 31.2,
    baseExcess: 5.6,
    lactate: 0.9,
    hbGdl: 14.6,
    fio2: 0.32,
    spo2AtSample: 92,
  },
  {
    mrn: 'HG400117',
    hoursAgo: 6,
    sampleType: 'arterial',
    ph: 7.41,
    pao2Kpa: 9.4,
    paco2Kpa: 4.9,
    sao2: 93.4,
    hco3: 22.8,
    baseExcess: -0.5,
    lactate: 1.8,
    hbGdl: 12.7,
    fio2: 0.5,
    spo2AtSample: 95,
  },
  {
    mrn: 'HG500363',
    hoursAgo: 4,
    sampleType: 'venous',
    ph: 7.35,
    pao2Kpa: 5.3,
    paco2Kpa: 6.1,
    sao2: 72,
    hco3: 25.0,
    baseExcess: 0.4,
    lactate: 2.1,
    hbGdl: 13.3,
    fio2: 0.4,
    spo2AtSample: 95,
  },
];
