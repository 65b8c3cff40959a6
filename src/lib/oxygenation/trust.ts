import { ComputationInputError } from './errors';
import { DEFAULT_TRUST_SETTINGS, resolveSettings, type TrustSettings } from './settings';
import type { Reading, TraceQuality } from './types';

/**
 * A reading is trusted when its trace is clean or weak, the perfusion index (when given) is not
 * under the setting (0.4 % by default; common practice, no standard), and it carries an SpO₂
 * value at all — a row without a saturation cannot vouch for the patient.
 */
export function isTrusted(r: Reading, s?: Partial<TrustSettings>): boolean {
  const minPi =
    s === undefined
      ? DEFAULT_TRUST_SETTINGS.minPerfusionIndexPct
      : resolveSettings(DEFAULT_TRUST_SETTINGS, s, 'trust').minPerfusionIndexPct;
  return trustedWith(r, minPi, -1);
}

/**
 * The hot-loop form: validates the fields trust depends on and reports the array index in the
 * error. Returns true/false; throws ComputationInputError for an unknown trace, an SpO₂ outside
 * 0–100 or a negative/non-finite perfusion index.
 */
export function trustedWith(r: Reading, minPi: number, index: number): boolean {
  const spo2 = r.spo2;
  if (spo2 !== null && !(spo2 >= 0 && spo2 <= 100)) {
    throw new ComputationInputError(field(index, 'spo2'), 'must be null or between 0 and 100', spo2);
  }
  const trace = r.trace;
  let goodTrace: boolean;
  if (trace === 'clean' || trace === 'weak') goodTrace = true;
  else if (trace === 'noisy' || trace === 'absent') goodTrace = false;
  else throw new ComputationInputError(field(index, 'trace'), 'must be clean, weak, noisy or absent', trace);
  const pi = r.perfusionIndex;
  if (pi !== undefined && pi !== null && !(pi >= 0 && pi < Infinity)) {
    throw new ComputationInputError(field(index, 'perfusionIndex'), 'must be a non-negative finite number', pi);
  }
  if (!goodTrace || spo2 === null) return false;
  return pi === undefined || pi === null || pi >= minPi;
}

/** The trace quality in the words of the board, the chart and the record. */
export const TRACE_WORDS: Record<TraceQuality, string> = {
  clean: 'clean trace',
  weak: 'weak trace',
  noisy: 'noisy trace',
  absent: 'no trace',
};

/**
 * Why a reading is not trusted, in the words the board and the chart show (null when it is trusted):
 * its trace, no SpO₂, or a perfusion index under the unit's threshold — with the value.
 */
export function untrustedReason(r: Reading, minPi: number): string | null {
  if (trustedWith(r, minPi, -1)) return null;
  if (r.trace === 'noisy') return TRACE_WORDS.noisy;
  if (r.trace === 'absent') return `${TRACE_WORDS.absent} (probe off?)`;
  if (r.spo2 === null) return 'no SpO₂ value';
  return `perfusion index ${r.perfusionIndex} % under ${minPi} %`;
}

function field(index: number, name: string): string {
  return index < 0 ? `reading.${name}` : `readings[${index}].${name}`;
}
