/**
 * What the escalation engine should do for one patient now, from the computation modules'
 * findings and the patient's escalations. Pure: the server runs the actions in one transaction.
 */
import type { BandStateResult, Concerns } from '~/lib/oxygenation/index.ts';

export type EscalationKind = 'below_band' | 'probe_check' | 'wean_prompt' | 'occult_hypoxaemia';
export const EMAILED_KINDS: readonly EscalationKind[] = ['below_band'];
/** Minutes back in band after which an open below-band escalation notes it. */
export const BACK_IN_BAND_NOTE_MIN = 30;

export interface OpenEscalation {
  id: number;
  kind: EscalationKind;
  severity: 'standard' | 'urgent' | null;
  runStart: number;
  backInBandNoted: boolean;
}

export type EscalationAction =
  | { type: 'raise'; kind: EscalationKind; severity: 'standard' | 'urgent' | null; runStart: number; runEnd: number }
  | { type: 'upgrade'; id: number; severity: 'urgent' }
  | { type: 'auto_close'; id: number; kind: EscalationKind; reason: string }
  | { type: 'back_in_band'; id: number };

export interface DecideInput {
  concerns: Concerns;
  state: BandStateResult;
  open: OpenEscalation[];
  /** Run start of the newest closed escalation of each kind: the same run is never raised twice. */
  lastClosedRunStart: Partial<Record<EscalationKind, number>>;
  /** The monitor fell silent right after trusted below-band readings: a probe check too. */
  silentAfterBelow?: { since: number; lastReading: { at: number } } | null;
}

export function decideEscalations({
  concerns,
  state,
  open,
  lastClosedRunStart,
  silentAfterBelow = null,
}: DecideInput): EscalationAction[] {
  const actions: EscalationAction[] = [];
  const openOf = (kind: EscalationKind) => open.find((e) => e.kind === kind);

  const below = concerns.belowBand;
  const openBelow = openOf('below_band');
  if (below) {
    if (openBelow) {
      if (below.severity === 'urgent' && openBelow.severity !== 'urgent')
        actions.push({ type: 'upgrade', id: openBelow.id, severity: 'urgent' });
    } else if (lastClosedRunStart.below_band !== below.runStart) {
      actions.push({
        type: 'raise',
        kind: 'below_band',
        severity: below.severity,
        runStart: below.runStart,
        runEnd: below.runEnd,
      });
    }
  } else if (
    openBelow &&
    !openBelow.backInBandNoted &&
    state.state === 'in' &&
    (state.sinceMin ?? 0) >= BACK_IN_BAND_NOTE_MIN
  ) {
    actions.push({ type: 'back_in_band', id: openBelow.id });
  }

  // Board prompts: raised while the condition holds, closed by the system once it clears.
  const prompts: [EscalationKind, { since: number; lastReading: { at: number } } | null, string][] = [
    [
      'probe_check',
      concerns.cannotVerify ?? silentAfterBelow,
      'A trusted reading came in: the trace can be verified again',
    ],
    ['wean_prompt', concerns.aboveOnOxygen, 'No longer above band on oxygen'],
  ];
  for (const [kind, concern, clearedReason] of prompts) {
    const existing = openOf(kind);
    if (concern && !existing && lastClosedRunStart[kind] !== concern.since) {
      actions.push({ type: 'raise', kind, severity: null, runStart: concern.since, runEnd: concern.lastReading.at });
    } else if (!concern && existing) {
      actions.push({ type: 'auto_close', id: existing.id, kind, reason: clearedReason });
    }
  }
  return actions;
}

/** Re-notify an unclaimed below-band escalation once the unit's re-notify time has passed since the last mail. */
export function renotifyDue(
  lastNotifiedAt: number | null,
  raisedAt: number,
  renotifyMin: number,
  now: number,
): boolean {
  return now - (lastNotifiedAt ?? raisedAt) >= renotifyMin * 60_000;
}

/** Delay before the next delivery attempt: base, 2×, 4× … (10 s, 20 s, 40 s by default), capped at 10 min. */
export function retryDelayMs(attempts: number, baseMs = 10_000): number {
  return Math.min(baseMs * 2 ** Math.max(0, attempts - 1), 10 * 60_000);
}

export const OUTCOMES = [
  'treated_at_bedside',
  'reviewed_by_outreach',
  'escalated_to_intensivist',
  'reading_was_artefact',
  'other',
] as const;
export type Outcome = (typeof OUTCOMES)[number];
export const OUTCOME_LABELS: Record<Outcome | 'condition_cleared', string> = {
  treated_at_bedside: 'Treated at the bedside',
  reviewed_by_outreach: 'Reviewed by outreach',
  escalated_to_intensivist: 'Escalated to the intensivist',
  reading_was_artefact: 'Reading was artefact',
  other: 'Other',
  condition_cleared: 'Condition cleared (closed by Ebbwatch)',
};

export const KIND_LABELS: Record<EscalationKind, string> = {
  below_band: 'Below band',
  probe_check: 'Probe check',
  wean_prompt: 'Wean prompt',
  occult_hypoxaemia: 'Occult hypoxaemia',
};

/** What an escalation stores as its proof: the run and the readings around it. */
export interface EscalationEvidence {
  rule: string | null;
  nadir: number | null;
  urgentReasons: string[];
  band: { low: number; high: number } | null;
  lastReadings: { at: number; spo2: number | null; trace: string; heartRate: number | null; source: string }[];
}
