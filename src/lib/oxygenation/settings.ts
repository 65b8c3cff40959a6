/**
 * Every tunable default of the oxygenation computations, in one place.
 *
 * These are SETTINGS, not clinical advice. Units can change most of them (the admin screen's
 * escalation settings); the defaults were chosen to match the product brief and common practice
 * and must be reviewed locally. Published constants are in constants.ts, not here.
 */
import { AASM_DESATURATION_PCT } from './constants';
import { ComputationInputError } from './errors';

/** Which readings count as trustworthy. */
export interface TrustSettings {
  /** Perfusion index (%) under which a reading is untrusted, when the PI is given. Common practice, no standard. */
  minPerfusionIndexPct: number;
}

/** How far a reading carries forward in time-in-band accounting. */
export interface ComplianceSettings extends TrustSettings {
  /** A charted reading stands for this long at most (matches the board's overdue-obs mark). */
  chartedMaxGapMin: number;
  /** A device reading stands for this long at most. */
  deviceMaxGapMin: number;
  /** An imported trend reading stands for this long at most. */
  importMaxGapMin: number;
}

/** Per-unit escalation settings (admin screen). */
export interface EscalationSettings extends TrustSettings {
  /** Trusted charted readings below band in a row that make a sustained-below concern. */
  consecutiveCharted: number;
  /** Minutes of trusted device/import readings below band that make a sustained-below concern. */
  deviceDwellMin: number;
  /** A run is urgent when any reading is this many points or more below the lower limit. */
  urgentMarginPoints: number;
  /** A run is urgent when any reading is under this SpO₂ (%). */
  urgentFloorPct: number;
  /** Minutes of untrusted-only readings that raise a probe check. */
  cannotVerifyMin: number;
  /** Minutes of trusted above-band readings on oxygen that raise a wean prompt. */
  aboveOnOxygenMin: number;
}

/** Desaturation event detection in continuous data. */
export interface DesaturationSettings {
  /** Drop below the running baseline that makes an event, in SpO₂ points (AASM rule 1A uses 3, 1B uses 4). */
  dropPct: number;
  /** Shortest event kept, seconds. Ours: the AASM ≥ 10 s belongs to the airflow rule, not the desaturation. */
  minDurationSec: number;
  /** Length of the running-baseline window before each sample, seconds. */
  baselineWindowSec: number;
  /** Samples further apart than this are a gap: the baseline restarts and open events close. */
  maxGapSec: number;
}

/** Pleth strip check. Cut-offs are ours: no universal cut-off is published (Elgendi 2016). */
export interface PlethSettings extends TrustSettings {
  /** Long moving-average window (s) whose output is the DC level used to find beats. */
  detrendWindowSec: number;
  /** Short smoothing window (s) applied before beat finding. */
  smoothingWindowSec: number;
  /** Highest heart rate accepted; sets the refractory time between beats. */
  maxHeartRate: number;
  /** Lowest heart rate accepted; longer beat intervals are rejected. */
  minHeartRate: number;
  /** Fewer clean beats than this: unusable. */
  minBeats: number;
  /** A candidate beat must reach this fraction of the median candidate height. */
  beatHeightFraction: number;
  /** Pulsatile range under this % of DC: flat trace, unusable. */
  flatTracePct: number;
  /** A one-second window whose range exceeds this multiple of the median window range is motion. */
  motionRangeFactor: number;
  /** A one-second window whose pulsatile range exceeds this % of DC is motion (no real pulse is that large). */
  motionMaxPulsatilePct: number;
  /** Share of the strip in motion above which the strip is unusable (any motion at all makes it doubtful). */
  motionUnusableFraction: number;
  /** Skewness below this: doubtful signal quality (skewness SQI, Elgendi 2016; cut-off ours). */
  skewnessDoubtfulBelow: number;
  /** Spread of R across beats (interquartile range / median) above this: doubtful. */
  maxRSpread: number;
}

export const DEFAULT_TRUST_SETTINGS: Readonly<TrustSettings> = Object.freeze({
  minPerfusionIndexPct: 0.4,
});

export const DEFAULT_COMPLIANCE_SETTINGS: Readonly<ComplianceSettings> = Object.freeze({
  ...DEFAULT_TRUST_SETTINGS,
  chartedMaxGapMin: 75,
  deviceMaxGapMin: 2,
  importMaxGapMin: 2,
});

export const DEFAULT_ESCALATION_SETTINGS: Readonly<EscalationSettings> = Object.freeze({
  ...DEFAULT_TRUST_SETTINGS,
  consecutiveCharted: 2,
  deviceDwellMin: 5,
  urgentMarginPoints: 5,
  urgentFloorPct: 85,
  cannotVerifyMin: 15,
  aboveOnOxygenMin: 30,
});

/** Only the keys the escalation checks know, from any larger settings object: they refuse unknown settings rather than ignore them. */
export function escalationSettingsOf(s: EscalationSettings): EscalationSettings {
  return {
    minPerfusionIndexPct: s.minPerfusionIndexPct,
    consecutiveCharted: s.consecutiveCharted,
    deviceDwellMin: s.deviceDwellMin,
    urgentMarginPoints: s.urgentMarginPoints,
    urgentFloorPct: s.urgentFloorPct,
    cannotVerifyMin: s.cannotVerifyMin,
    aboveOnOxygenMin: s.aboveOnOxygenMin,
  };
}

export const DEFAULT_DESATURATION_SETTINGS: Readonly<DesaturationSettings> = Object.freeze({
  dropPct: AASM_DESATURATION_PCT.rule1A,
  minDurationSec: 10,
  baselineWindowSec: 120,
  maxGapSec: 120,
});

export const DEFAULT_PLETH_SETTINGS: Readonly<PlethSettings> = Object.freeze({
  ...DEFAULT_TRUST_SETTINGS,
  detrendWindowSec: 1.5,
  smoothingWindowSec: 0.05,
  maxHeartRate: 240,
  minHeartRate: 25,
  minBeats: 3,
  beatHeightFraction: 0.4,
  flatTracePct: 0.02,
  motionRangeFactor: 3,
  motionMaxPulsatilePct: 20,
  motionUnusableFraction: 0.25,
  skewnessDoubtfulBelow: 0,
  maxRSpread: 0.1,
});

/**
 * Plausibility limits for charted observations. A value outside them is refused as a data-entry
 * error rather than scored; they are deliberately wide.
 */
export const INPUT_LIMITS = Object.freeze({
  respRate: { min: 0, max: 120 },
  spo2: { min: 0, max: 100 },
  systolic: { min: 0, max: 350 },
  pulse: { min: 0, max: 350 },
  temperature: { min: 20, max: 45 },
  fio2: { min: 0.21, max: 1 },
  haemoglobinGdl: { min: 0, max: 30 },
  po2MmHg: { min: 0, max: 800 },
  flowLpm: { min: 0, max: 80 },
});

/** Merges overrides onto defaults, refusing anything that is not a positive finite number. */
export function resolveSettings<T extends object>(
  defaults: Readonly<T>,
  overrides: Partial<T> | undefined,
  name: string,
): T {
  const merged = { ...defaults } as T;
  // An override left undefined keeps the default, so callers can spread partial unit settings.
  for (const [key, value] of Object.entries((overrides ?? {}) as Record<string, unknown>)) {
    if (value !== undefined) (merged as Record<string, unknown>)[key] = value;
  }
  for (const [key, value] of Object.entries(merged as Record<string, unknown>)) {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
      throw new ComputationInputError(`${name}.${key}`, 'must be a non-negative finite number', value);
    }
  }
  return merged;
}
