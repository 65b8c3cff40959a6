/**
 * JSON shapes of the escalations API (what the endpoints send and the queue, the bed chart and the
 * board read). Times are ISO 8601 strings in UTC, shown in `unit.timeZone`.
 */
import type { EscalationEvidence, EscalationKind } from './decide.ts';

/** What the signed-in person may do with this escalation now, decided on the server from the role groups and its state. */
export interface EscalationCan {
  claim: boolean;
  close: boolean;
}

export interface EscalationView {
  id: number;
  kind: EscalationKind;
  kindLabel: string;
  severity: 'standard' | 'urgent' | null;
  state: 'raised' | 'claimed' | 'closed';
  raisedAt: string;
  runStart: string;
  runEnd: string;
  unit: { code: string; name: string; timeZone: string };
  bedLabel: string | null;
  patient: { id: number; label: string };
  claimedBy: string | null;
  claimedAt: string | null;
  closedBy: string | null;
  closedAt: string | null;
  outcome: string | null;
  outcomeLabel: string | null;
  closeNote: string | null;
  raisedToClaimedMin: number | null;
  claimedToClosedMin: number | null;
  lastNotifiedAt: string | null;
  notifyCount: number;
  backInBandAt: string | null;
  evidence: EscalationEvidence;
  can: EscalationCan;
}

/** An open escalation as the queue gets it: with the patient's SpO₂ now and its last 30 minutes (one point a minute). */
export interface QueueEscalation extends EscalationView {
  current?: { spo2: number; at: string; source: string; trusted: boolean } | null;
  trend?: { t: number; v: number }[];
}

/** `GET /api/escalations`. */
export interface EscalationList {
  escalations: QueueEscalation[];
  generatedAt: string;
}

/** `GET /api/escalations/:id`, and the answer to claim and close. */
export interface EscalationDetail extends EscalationView {
  events: { id: number; type: string; at: string; actor: string; detail: unknown }[];
}
