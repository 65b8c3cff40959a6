/**
 * Judges one patient now: from the patient's recent readings, band, unit settings and escalations
 * to what the engine should do. Pure, and the only path from readings to a decision — the engine
 * (under the patient's row lock) and the sweep (its read-only first pass) both call it.
 */
import { bandState, detectConcerns, type BandStateResult, type Concerns, type Reading } from '~/lib/oxygenation/index.ts';
import { escalationSettingsOf, type EscalationSettings } from '~/lib/oxygenation/settings.ts';
import { decideEscalations, type EscalationAction, type EscalationKind, type OpenEscalation } from './decide.ts';

export interface JudgeInput {
  /** Recent current readings, oldest first (device, import and charted). */
  readings: Reading[];
  /** The band in force now, with the time it was ordered; null when none is ordered. */
  band: { low: number; high: number; orderedAt: number } | null;
  settings: EscalationSettings;
  open: OpenEscalation[];
  lastClosedRunStart: Partial<Record<EscalationKind, number>>;
  now: number;
}

export interface Judgement {
  /** The readings judged: those taken under the band in force now. */
  readings: Reading[];
  band: { low: number; high: number } | null;
  concerns: Concerns;
  state: BandStateResult;
  actions: EscalationAction[];
}

/** Judge only readings taken under the band in force now: an older band's readings are not re-judged. */
export function readingsUnderBand<R extends { at: number }>(readings: R[], band: { orderedAt: number } | null): R[] {
  return band ? readings.filter((r) => r.at >= band.orderedAt) : readings;
}

export function judgePatient(input: JudgeInput): Judgement {
  const band = input.band ? { low: input.band.low, high: input.band.high } : null;
  const readings = readingsUnderBand(input.readings, input.band);
  const concerns = detectConcerns(readings, band, input.now, escalationSettingsOf(input.settings));
  const state = bandState(readings, band, input.now, { minPerfusionIndexPct: input.settings.minPerfusionIndexPct });
  const actions = decideEscalations({ concerns, state, open: input.open, lastClosedRunStart: input.lastClosedRunStart });
  return { readings, band, concerns, state, actions };
}

/** An open escalation row as the decision reads it. */
export function toOpenEscalation(e: { id: number; kind: EscalationKind; severity: 'standard' | 'urgent' | null; run_start: Date | string; back_in_band_at: Date | string | null }): OpenEscalation {
  return { id: e.id, kind: e.kind, severity: e.severity, runStart: new Date(e.run_start).getTime(), backInBandNoted: e.back_in_band_at !== null };
}

/** Run starts of the newest closed escalation of each kind (rows newest last or one per kind). */
export function lastClosedRunStarts(rows: { kind: EscalationKind; run_start: Date | string }[]): Partial<Record<EscalationKind, number>> {
  return Object.fromEntries(rows.map((c) => [c.kind, new Date(c.run_start).getTime()])) as Partial<Record<EscalationKind, number>>;
}
