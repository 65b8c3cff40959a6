/** JSON shapes of the blood-gas API. Pressures are sent in mmHg and, for showing, in the unit's gas unit. */
import type { BerlinBand, DerivedGas, GasFlag, GasUnit, SampleType } from './compute.ts';

export type GasStatus = 'current' | 'superseded' | 'entered_in_error';

export interface BloodGasView {
  id: number;
  sampledAt: string;
  sampleType: SampleType;
  ph: number;
  pao2MmHg: number;
  paco2MmHg: number;
  /** The unit the nurse typed the pressures in. */
  enteredUnit: GasUnit;
  sao2: number;
  hco3: number | null;
  baseExcess: number | null;
  lactate: number | null;
  hbGdl: number | null;
  fio2: number;
  spo2AtSample: number | null;
  /** Where the SpO₂ of the pair came from: typed by the nurse, or the nearest trusted reading within 2 min. */
  spo2Source: 'entered' | 'nearest_reading' | null;
  note: string | null;
  status: GasStatus;
  replacesId: number | null;
  replacedById: number | null;
  statusReason: string | null;
  statusBy: string | null;
  statusAt: string | null;
  recordedBy: string | null;
  recordedAt: string;
  derived: DerivedGas;
  flags: GasFlag[];
}

export interface BloodGasList {
  /** Newest first, every status. */
  bloodGases: BloodGasView[];
  gasUnit: GasUnit;
  barometricMmHg: number;
  /** Median SpO₂ − SaO₂ over the current arterial pairs. */
  bias: { median: number; pairs: number } | null;
  occultCount: number;
  timeZone: string;
}

export interface BloodGasCreated {
  bloodGas: BloodGasView;
  derived: DerivedGas;
  flags: GasFlag[];
}

export interface NearestSpo2 {
  spo2: number;
  at: string;
  source: string;
}

/** What the series API carries for the chart: SaO₂ marks at the sample time. */
export interface GasMark {
  id: number;
  t: number;
  sao2: number;
  spo2AtSample: number | null;
  sampleType: SampleType;
  occult: boolean;
}

export type { BerlinBand };
