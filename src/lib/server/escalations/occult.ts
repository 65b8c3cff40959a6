/**
 * The occult-hypoxaemia bedside task: an escalation of kind `occult_hypoxaemia`, raised in the
 * blood-gas transaction through the same escalation rows, timeline and audit as every other kind
 * (one open per patient, held by the unique open key). A bedside task like a probe check: shown
 * on the board tile, the bed chart and the queue, not e-mailed. It closes by a person (claim and
 * close, with an outcome), or by Ebbwatch when the gas that raised it is corrected or marked in error.
 */
import type { Knex } from 'knex';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { insertEscalation, insertEvent, updateEscalation } from '~/lib/server/queries/escalations.ts';
import { openOccultEscalation } from '~/lib/server/queries/blood-gases.ts';
import { patientContext } from '~/lib/server/queries/escalation-context.ts';

export interface OccultEvidence {
  bloodGasId: number;
  sampledAt: number;
  sao2: number;
  spo2AtSample: number;
}

const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v) as { bloodGas?: OccultEvidence } | null;

/** Raises the task for a gas pair (the patient row is locked by the caller); none when one is open already. */
export async function raiseOccultHypoxaemia(
  trx: Knex.Transaction,
  patientId: number,
  gas: OccultEvidence,
  now: Date,
): Promise<number | null> {
  const ctx = await patientContext(trx, patientId);
  if (!ctx) return null;
  const open = await openOccultEscalation(trx, patientId);
  if (open) return null;
  const evidence = {
    rule: 'occult_hypoxaemia',
    nadir: gas.sao2,
    urgentReasons: [],
    band: ctx.band ? { low: ctx.band.low, high: ctx.band.high } : null,
    lastReadings: [],
    bloodGas: gas,
  };
  const at = new Date(gas.sampledAt);
  const id = await insertEscalation(trx, {
    patient_id: patientId,
    unit_id: ctx.unitId,
    bed_id: ctx.bedId,
    kind: 'occult_hypoxaemia',
    severity: null,
    state: 'raised',
    raised_at: now,
    run_start: at,
    run_end: at,
    evidence: JSON.stringify(evidence),
    last_notified_at: null,
    notify_count: 0,
  });
  await insertEvent(trx, {
    escalation_id: id,
    type: 'raised',
    actor_id: null,
    at: now,
    detail: { bloodGasId: gas.bloodGasId, sao2: gas.sao2, spo2AtSample: gas.spo2AtSample },
  });
  await writeAudit(trx, {
    actorId: null,
    action: 'escalation.raise',
    entity: 'escalation',
    entityId: id,
    after: { patientId, kind: 'occult_hypoxaemia', bloodGasId: gas.bloodGasId },
    at: now,
  });
  return id;
}

/** Closes the open task when the gas that raised it no longer stands (corrected without the flag, or in error). */
export async function clearOccultHypoxaemia(
  trx: Knex.Transaction,
  patientId: number,
  bloodGasId: number,
  reason: string,
  now: Date,
): Promise<number | null> {
  const open = await openOccultEscalation(trx, patientId);
  if (!open || parse(open.evidence)?.bloodGas?.bloodGasId !== bloodGasId) return null;
  await updateEscalation(trx, open.id, {
    state: 'closed',
    closed_at: now,
    outcome: 'condition_cleared',
    close_note: reason,
  });
  await insertEvent(trx, {
    escalation_id: open.id,
    type: 'closed',
    actor_id: null,
    at: now,
    detail: { outcome: 'condition_cleared', note: reason },
  });
  await writeAudit(trx, {
    actorId: null,
    action: 'escalation.auto_close',
    entity: 'escalation',
    entityId: open.id,
    after: { outcome: 'condition_cleared', bloodGasId },
    at: now,
  });
  return open.id;
}
