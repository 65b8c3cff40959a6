/** The open escalation of each patient that matters most on a board tile: urgent below band, then below band, then the rest. */
import type { BedInput } from '~/lib/board/tiles.ts';
import { openForPatients } from '~/lib/server/queries/escalations.ts';

const weight = (e: { kind: string; severity: string | null }) => (e.kind === 'below_band' ? (e.severity === 'urgent' ? 0 : 1) : e.kind === 'probe_check' ? 2 : 3);

export async function openEscalationsByPatient(patientIds: number[]): Promise<Map<number, NonNullable<BedInput['escalation']>>> {
  const rows = await openForPatients(patientIds);
  const out = new Map<number, NonNullable<BedInput['escalation']>>();
  for (const e of rows.sort((a, b) => weight(a) - weight(b))) {
    if (out.has(e.patient_id)) continue;
    out.set(e.patient_id, {
      id: e.id, kind: e.kind, severity: e.severity, state: e.state as 'raised' | 'claimed', raisedAt: new Date(e.raised_at).getTime(), claimedBy: e.claimed_by_name,
    });
  }
  return out;
}
