/**
 * Shapes shared by the oxygenation computations. Times are epoch milliseconds everywhere so the
 * hot loops never build Date objects; saturations are in percent, FiO₂ as a fraction.
 */

export type TraceQuality = 'clean' | 'weak' | 'noisy' | 'absent';

export type OxygenDevice =
  | 'room_air'
  | 'nasal_cannula'
  | 'simple_mask'
  | 'reservoir_mask'
  | 'high_flow_nasal'
  | 'niv'
  | 'ventilator';

export type ReadingSource = 'charted' | 'device' | 'import';

export interface Reading {
  /** Epoch milliseconds. */
  at: number;
  /** SpO₂ in percent (0–100); null when the row carries no saturation (e.g. probe off). */
  spo2: number | null;
  heartRate?: number | null;
  /** Inspired oxygen as a fraction (0.21–1.0). */
  fio2?: number | null;
  /** True when fio2 came from estimateFio2 rather than from a charted or device value. */
  fio2Estimated?: boolean;
  device?: OxygenDevice | null;
  trace: TraceQuality;
  /** Perfusion index in percent (infrared AC/DC × 100), when the monitor reports it. */
  perfusionIndex?: number | null;
  source: ReadingSource;
}

/** One target-band order. A list of orders is sorted by `from`; each applies until the next. */
export interface BandOrder {
  /** Epoch milliseconds at which the order takes effect. */
  from: number;
  /** Lower limit of the target band, SpO₂ %. */
  low: number;
  /** Upper limit of the target band, SpO₂ %. */
  high: number;
}

export interface Band {
  low: number;
  high: number;
}

export interface TimeWindow {
  /** Inclusive start, epoch ms. */
  from: number;
  /** Exclusive end, epoch ms. */
  to: number;
}

export const TRACE_QUALITIES: readonly TraceQuality[] = ['clean', 'weak', 'noisy', 'absent'];
export const OXYGEN_DEVICES: readonly OxygenDevice[] = [
  'room_air',
  'nasal_cannula',
  'simple_mask',
  'reservoir_mask',
  'high_flow_nasal',
  'niv',
  'ventilator',
];
export const READING_SOURCES: readonly ReadingSource[] = ['charted', 'device', 'import'];
