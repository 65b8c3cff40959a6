/** The open escalation of each patient that matters most on a board tile: urgent below band, then below band, then the rest. */
import type { BedInput, OccultFlag } from '~/lib/board/tiles.ts';
import { openForPatients } from '~/lib/server/queries/escalations.ts';

const weight = (e: { kind: string; severity: string | null }) =>
  e.kind === 'below_band' ? (e.severity === 'urgent' ? 0 : 1) : e.kind === 'probe_check' ? 2 : 3;

export async function openEscalationsByPatient(
  patientIds: number[],
): Promise<Map<number, NonNullable<BedInput['escalation']>> & { occult: Map<number, OccultFlag> }> {
  const rows = await openForPatients(patientIds);
  const out = Object.assign(new Map<number, NonNullable<BedInput['escalation']>>(), {
    occult: new Map<number, OccultFlag>(),
  });
  // An occult-hypoxaemia task shows on the tile whatever else is open (from the same rows: no extra query).
  for (const e of rows) {
    if (e.kind !== 'occult_hypoxaemia') continue;
    const g = (typeof e.evidence === 'string' ? JSON.parse(e.evidence) : e.evidence)?.bloodGas;
    if (g)
      out.occult.set(e.patient_id, {
        escalationId: e.id,
        sampledAt: g.sampledAt,
        sao2: g.sao2,
        spo2AtSample: g.spo2AtSample,
        state: e.state as 'raised' | 'claimed',
      });
  }
  for (const e of rows.sort((a, b) => weight(a) - weight(b))) {
    if (out.has(e.patient_id) || e.kind === 'occult_hypoxaemia') continue; // shown as its own flag
    out.set(e.patient_id, {
      id: e.id,
      kind: e.kind,
      severity: e.severity,
      state: e.state as 'raised' | 'claimed',
      raisedAt: new Date(e.raised_at).getTime(),
      claimedBy: e.claimed_by_name,
    });
  }
  return out;
}
