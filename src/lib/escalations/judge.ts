/**
 * Judges one patient now: from the patient's recent readings, band, unit settings and escalations
 * to what the engine should do. Pure, and the only path from readings to a decision — the engine
 * (under the patient's row lock) and the sweep (its read-only first pass) both call it.
 */
import {
  bandState,
  detectConcerns,
  type BandStateResult,
  type Concerns,
  type Reading,
} from '~/lib/oxygenation/index.ts';
import { isTrusted } from '~/lib/oxygenation/trust.ts';
import { escalationSettingsOf, type EscalationSettings } from '~/lib/oxygenation/settings.ts';
import { decideEscalations, type EscalationAction, type EscalationKind, type OpenEscalation } from './decide.ts';

export interface JudgeInput {
  /** Recent current readings, oldest first (device, import and charted). */
  readings: Reading[];
  /** The band in force now, with the time it was ordered; null when none is ordered. */
  band: { low: number; high: number; orderedAt: number } | null;
  /** `silentBelowProbeMin`: a monitor silent this long right after trusted below-band readings asks for a probe check (unit setting, default 3). */
  settings: EscalationSettings & { silentBelowProbeMin?: number };
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
  /** The monitor fell silent right after trusted below-band readings (a bedside probe check). */
  silentAfterBelow: SilentAfterBelow | null;
  actions: EscalationAction[];
}

export interface SilentAfterBelow {
  since: number;
  sinceMin: number;
  lastReading: Reading;
}

/**
 * A monitor silent for `silentMin` right after a trusted below-band reading: the newest reading is a
 * device or import reading, trusted, below the band, and nothing came after it. Silence must not end a
 * below-band concern quietly: it asks the bedside to check the probe (issue 10 point 2).
 */
export function silentAfterBelow(
  readings: Reading[],
  band: { low: number } | null,
  now: number,
  silentMin: number,
  minPerfusionIndexPct: number,
): SilentAfterBelow | null {
  if (!band) return null;
  let last: Reading | undefined;
  for (const r of readings) if (r.at <= now) last = r;
  if (!last || last.source === 'charted' || last.spo2 === null || last.spo2 >= band.low) return null;
  if (!isTrusted(last, { minPerfusionIndexPct })) return null;
  const silentMs = now - last.at;
  if (silentMs < silentMin * 60_000) return null;
  return { since: last.at, sinceMin: silentMs / 60_000, lastReading: last };
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
  const silent = silentAfterBelow(
    readings,
    band,
    input.now,
    input.settings.silentBelowProbeMin ?? 3,
    input.settings.minPerfusionIndexPct,
  );
  const actions = decideEscalations({
    concerns,
    state,
    open: input.open,
    lastClosedRunStart: input.lastClosedRunStart,
    silentAfterBelow: silent,
  });
  return { readings, band, concerns, state, silentAfterBelow: silent, actions };
}

/** An open escalation row as the decision reads it. */
export function toOpenEscalation(e: {
  id: number;
  kind: EscalationKind;
  severity: 'standard' | 'urgent' | null;
  run_start: Date | string;
  back_in_band_at: Date | string | null;
}): OpenEscalation {
  return {
    id: e.id,
    kind: e.kind,
    severity: e.severity,
    runStart: new Date(e.run_start).getTime(),
    backInBandNoted: e.back_in_band_at !== null,
  };
}

/** Run starts of the newest closed escalation of each kind (rows newest last or one per kind). */
export function lastClosedRunStarts(
  rows: { kind: EscalationKind; run_start: Date | string }[],
): Partial<Record<EscalationKind, number>> {
  return Object.fromEntries(rows.map((c) => [c.kind, new Date(c.run_start).getTime()])) as Partial<
    Record<EscalationKind, number>
  >;
}
