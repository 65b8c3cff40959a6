import {
  NEWS2_CONSCIOUSNESS_NOT_ALERT_SCORE,
  NEWS2_HIGH_FROM,
  NEWS2_MEDIUM_FROM,
  NEWS2_ON_OXYGEN_SCORE,
  NEWS2_PULSE,
  NEWS2_RESP_RATE,
  NEWS2_SCALE2_AIR_BOUNDARY_PCT,
  NEWS2_SPO2_SCALE1,
  NEWS2_SPO2_SCALE2_LOW,
  NEWS2_SPO2_SCALE2_ON_OXYGEN_HIGH,
  NEWS2_SYSTOLIC,
  NEWS2_TEMPERATURE,
  type StepTable,
} from './constants';
import { ComputationInputError, requireInRange } from './errors';
import { INPUT_LIMITS } from './settings';

/** The levels of consciousness charted (ACVPU with new confusion): the one list the form, API and NEWS2 use. */
export const CONSCIOUSNESS = ['alert', 'new_confusion', 'voice', 'pain', 'unresponsive'] as const;
export type Consciousness = (typeof CONSCIOUSNESS)[number];

/** A stored value as a level, or null when absent or not one of the levels. */
export function asConsciousness(value: string | null | undefined): Consciousness | null {
  return value !== null && value !== undefined && (CONSCIOUSNESS as readonly string[]).includes(value)
    ? (value as Consciousness)
    : null;
}

export interface News2Observations {
  respRate?: number | null;
  spo2?: number | null;
  onOxygen?: boolean | null;
  systolic?: number | null;
  pulse?: number | null;
  consciousness?: Consciousness | null;
  temperature?: number | null;
}

export type News2Parameter =
  | 'respRate'
  | 'spo2'
  | 'airOrOxygen'
  | 'systolic'
  | 'pulse'
  | 'consciousness'
  | 'temperature';
export type News2Response = 'low' | 'low_medium' | 'medium' | 'high';

export interface News2Result {
  /** Aggregate score, or null when any parameter is missing (a partial sum would under-read). */
  total: number | null;
  complete: boolean;
  missing: News2Parameter[];
  parts: Record<News2Parameter, number | null>;
  response: News2Response | null;
  /** Any single parameter scoring 3 (among those present). */
  anyThree: boolean;
  scale: 1 | 2;
}

const PARAMETERS: readonly News2Parameter[] = [
  'respRate',
  'spo2',
  'airOrOxygen',
  'systolic',
  'pulse',
  'consciousness',
  'temperature',
];

/**
 * Rounds half away from zero at `decimals`, on the decimal value as written: 38.05 × 10 is
 * 380.49999999999994 in binary floating point, so the product is first cut to 15 significant
 * digits (380.5) and then rounded (381 → 38.1).
 */
export function roundHalfUp(value: number, decimals: number): number {
  const shifted = Number((Math.abs(value) * 10 ** decimals).toPrecision(15));
  return (Math.sign(value) * Math.round(shifted)) / 10 ** decimals;
}

function stepScore(table: StepTable, value: number): number {
  for (const [upTo, score] of table.steps) if (value <= upTo) return score;
  return table.above;
}

/**
 * NEWS2 (Royal College of Physicians, 2017), Scale 1 or Scale 2 for SpO₂.
 *
 * Rounding (ours, documented): the RCP chart is in whole numbers, temperature to one decimal.
 * A value between steps is first rounded half-up to the chart's precision — respiratory rate,
 * SpO₂, systolic BP and pulse to whole numbers, temperature to 0.1 °C — and then scored, so
 * 20.4 /min scores as 20 and 20.5 /min as 21.
 *
 * Missing (null/undefined) parameters are listed and make the total and response null. Scale 2
 * needs the air/oxygen status to score SpO₂ ≥ 93 %; without it the SpO₂ part is null too.
 * Values outside plausibility limits (settings.INPUT_LIMITS) or NaN throw ComputationInputError.
 */
export function news2(obs: News2Observations, scale: 1 | 2): News2Result {
  if (scale !== 1 && scale !== 2) throw new ComputationInputError('scale', 'must be 1 or 2', scale);
  const present = (v: unknown): boolean => v !== null && v !== undefined;
  const parts: Record<News2Parameter, number | null> = {
    respRate: null,
    spo2: null,
    airOrOxygen: null,
    systolic: null,
    pulse: null,
    consciousness: null,
    temperature: null,
  };

  if (present(obs.respRate)) {
    const v = requireInRange('respRate', obs.respRate, INPUT_LIMITS.respRate.min, INPUT_LIMITS.respRate.max);
    parts.respRate = stepScore(NEWS2_RESP_RATE, roundHalfUp(v, 0));
  }
  if (present(obs.onOxygen)) {
    if (typeof obs.onOxygen !== 'boolean')
      throw new ComputationInputError('onOxygen', 'must be true or false', obs.onOxygen);
    parts.airOrOxygen = obs.onOxygen ? NEWS2_ON_OXYGEN_SCORE : 0;
  }
  if (present(obs.spo2)) {
    const v = roundHalfUp(requireInRange('spo2', obs.spo2, INPUT_LIMITS.spo2.min, INPUT_LIMITS.spo2.max), 0);
    if (scale === 1) parts.spo2 = stepScore(NEWS2_SPO2_SCALE1, v);
    else if (v < NEWS2_SCALE2_AIR_BOUNDARY_PCT) parts.spo2 = stepScore(NEWS2_SPO2_SCALE2_LOW, v);
    else if (obs.onOxygen === true) parts.spo2 = stepScore(NEWS2_SPO2_SCALE2_ON_OXYGEN_HIGH, v);
    else if (obs.onOxygen === false) parts.spo2 = 0;
    // else: ≥ 93 % on Scale 2 with unknown air/oxygen — cannot be scored, stays null.
  }
  if (present(obs.systolic)) {
    const v = requireInRange('systolic', obs.systolic, INPUT_LIMITS.systolic.min, INPUT_LIMITS.systolic.max);
    parts.systolic = stepScore(NEWS2_SYSTOLIC, roundHalfUp(v, 0));
  }
  if (present(obs.pulse)) {
    const v = requireInRange('pulse', obs.pulse, INPUT_LIMITS.pulse.min, INPUT_LIMITS.pulse.max);
    parts.pulse = stepScore(NEWS2_PULSE, roundHalfUp(v, 0));
  }
  if (present(obs.consciousness)) {
    if (!(CONSCIOUSNESS as readonly string[]).includes(obs.consciousness as string)) {
      throw new ComputationInputError(
        'consciousness',
        'must be alert, new_confusion, voice, pain or unresponsive',
        obs.consciousness,
      );
    }
    parts.consciousness = obs.consciousness === 'alert' ? 0 : NEWS2_CONSCIOUSNESS_NOT_ALERT_SCORE;
  }
  if (present(obs.temperature)) {
    const v = requireInRange(
      'temperature',
      obs.temperature,
      INPUT_LIMITS.temperature.min,
      INPUT_LIMITS.temperature.max,
    );
    parts.temperature = stepScore(NEWS2_TEMPERATURE, roundHalfUp(v, 1));
  }

  const missing = PARAMETERS.filter((p) => parts[p] === null);
  const anyThree = PARAMETERS.some((p) => parts[p] === 3);
  const complete = missing.length === 0;
  const total = complete ? PARAMETERS.reduce((sum, p) => sum + (parts[p] as number), 0) : null;
  return {
    total,
    complete,
    missing,
    parts,
    response: total === null ? null : news2Response(total, anyThree),
    anyThree,
    scale,
  };
}

/** RCP response bands: ≥ 7 high; 5–6 medium; a single 3 with aggregate < 5 low–medium; else low. */
export function news2Response(total: number, anyThree: boolean): News2Response {
  if (total >= NEWS2_HIGH_FROM) return 'high';
  if (total >= NEWS2_MEDIUM_FROM) return 'medium';
  return anyThree ? 'low_medium' : 'low';
}
