/**
 * JSON shapes of the charting API (what the endpoints send and the islands read).
 * Times are ISO 8601 strings in UTC; islands show them in `timeZone` of the unit.
 */
import type { OxygenDevice, ReadingSource, TraceQuality } from '~/lib/oxygenation/types.ts';
import type { Consciousness } from '~/lib/oxygenation/news2.ts';
import type { GasMark } from '~/lib/bloodgas/api-types.ts';

export interface OrderView {
  id: number;
  low: number;
  high: number;
  news2Scale: 1 | 2;
  preset: string | null;
  reason: string;
  scaleReason: string | null;
  orderedAt: string;
  orderedBy: string;
  supersedesId: number | null;
  /** For a Scale 2 order: what the latest blood gas said when it was ordered, or that none supported it. */
  scale2Basis: string | null;
}

export interface StayView {
  id: number;
  bedId: number;
  bedLabel: string;
  unitCode: string;
  unitName: string;
  startedAt: string;
  endedAt: string | null;
  endReason: 'moved' | 'discharged' | null;
  startedBy: string | null;
  endedBy: string | null;
}

export interface PatientSummary {
  id: number;
  mrn: string;
  givenName: string;
  familyName: string;
  label: string;
  dateOfBirth: string;
  co2RetentionRisk: boolean;
  /** The bed now, or null once discharged. */
  bed: { id: number; label: string; unitCode: string; unitName: string } | null;
  admittedAt: string | null;
  band: OrderView | null;
}

export interface PatientDetail extends PatientSummary {
  timeZone: string;
  stays: StayView[];
  /** Every order, newest first. */
  orders: OrderView[];
  /** The last current charted obs (device and FiO₂ defaults for the entry form). */
  lastCharted: ObsView | null;
  /** What the signed-in user may do here, decided on the server. */
  can: { chart: boolean; order: boolean; admit: boolean };
}

export type ObsStatus = 'current' | 'superseded' | 'entered_in_error' | 'withdrawn';

export interface ObsView {
  id: number;
  takenAt: string;
  source: ReadingSource;
  spo2: number | null;
  heartRate: number | null;
  respRate: number | null;
  fio2: number | null;
  fio2Estimated: boolean;
  device: OxygenDevice | null;
  flowLpm: number | null;
  trace: TraceQuality;
  perfusionIndex: number | null;
  probeSite: string | null;
  systolic: number | null;
  temperature: number | null;
  consciousness: Consciousness | null;
  note: string | null;
  status: ObsStatus;
  replacesId: number | null;
  replacedById: number | null;
  statusReason: string | null;
  statusBy: string | null;
  statusAt: string | null;
  recordedBy: string | null;
  recordedAt: string;
  /** E.g. "Below calibrated range — confirm with arterial blood gas". */
  notices: string[];
}

export interface ObsPage {
  items: ObsView[];
  page: number;
  pageSize: number;
  total: number;
}

/** `lo` / `hi`: the min–max envelope when the point stands for a bucket of readings (long windows). */
export interface SeriesPoint {
  t: number;
  v: number;
  lo?: number;
  hi?: number;
}
export interface Spo2Point extends SeriesPoint {
  trusted: boolean;
  source: ReadingSource;
}
/** FiO₂ step: the value from `t` until the next step, with the device and flow charted with it. */
export interface Fio2Step extends SeriesPoint {
  device: OxygenDevice | null;
  flowLpm: number | null;
  estimated: boolean;
}
export interface BandSegment {
  from: number;
  to: number;
  low: number;
  high: number;
}

export interface DerivedFigures {
  window: { from: string; to: string; hours: number };
  compliance: {
    inBandMin: number;
    belowMin: number;
    aboveMin: number;
    untrustedMin: number;
    noReadingMin: number;
    noBandMin: number;
    windowMin: number;
    burdenPctMin: number;
    inBandPct: number | null;
    trustedReadings: number;
    untrustedReadings: number;
  };
  latest: {
    takenAt: string | null;
    spo2: number | null;
    fio2: number | null;
    fio2Estimated: boolean;
    device: OxygenDevice | null;
    sf: number | null;
    rox: number | null;
    roxNote: string | null;
    imputedPf: { pao2: number; pf: number } | null;
    imputedPfNote: string | null;
    news2: {
      total: number | null;
      complete: boolean;
      missing: string[];
      response: string | null;
      scale: 1 | 2;
      takenAt: string;
    } | null;
  };
}

export interface SeriesResponse {
  patientId: number;
  hours: number;
  from: number;
  to: number;
  generatedAt: string;
  spo2: Spo2Point[];
  heartRate: SeriesPoint[];
  /** Step line: each point holds until the next. */
  fio2: Fio2Step[];
  /** 0 when the lines are raw readings (downsampled); else the bucket each enveloped point stands for. */
  bucketMs: number;
  bands: BandSegment[];
  /** Filled once escalations exist: raised/closed marks on the chart. */
  escalations: { id: number; raisedAt: number; closedAt: number | null; kind: string; severity: string | null }[];
  /**
   * The newest SpO₂ reading itself (not a per-minute mean or a thinned point): what the chart's
   * headline shows, with its time and source. Null when the window holds none.
   */
  newestReading: Spo2Point | null;
  /** Readings in the window before downsampling, per line. */
  rawCounts: { spo2: number; heartRate: number };
  /** Current blood gases sampled in the window: SaO₂ marks at the sample time. */
  bloodGases: GasMark[];
  derived: DerivedFigures;
}

/** The chart windows the series API serves and the bed chart offers, in hours. */
export const CHART_WINDOW_HOURS = [6, 12, 24, 72] as const;
export type WindowHours = (typeof CHART_WINDOW_HOURS)[number];
export const DEFAULT_WINDOW_HOURS: WindowHours = 12;
