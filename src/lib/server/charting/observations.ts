/**
 * Charting obs. Nothing is deleted: a correction is a new row naming the one it replaces, which
 * is marked superseded; "entered in error" marks the row. Every write is audited in its transaction.
 */
import type { Knex } from 'knex';
import type { ObsPage, ObsView } from '~/lib/charting/api-types.ts';
import { BEFORE_STAY_SLACK_MS, type ObsInput } from '~/lib/charting/obs-input.ts';
import { estimateFio2 } from '~/lib/oxygenation/index.ts';
import { ROOM_AIR_FIO2 } from '~/lib/oxygenation/constants.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  findObservation,
  insertObservation,
  lockObservation,
  markObservation,
  observationPage,
  type NewObservation,
  type ObservationRow,
} from '~/lib/server/queries/observations.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from './patients.ts';
import { lockPatient, openStayOfPatient } from '~/lib/server/queries/patients.ts';
import { checkPatientEscalations } from '~/lib/server/escalations/engine.ts';
import { obsView } from './views.ts';
import { assertChangeable } from './access.ts';
import { refreshMinuteRollup } from '~/lib/server/queries/rollup.ts';

/** FiO₂ as stored: charted when given; 0.21 on room air; otherwise an estimate, always marked as one. */
export function resolveFio2(input: Pick<ObsInput, 'fio2' | 'device' | 'flowLpm'>): {
  fio2: number | null;
  estimated: boolean;
} {
  if (input.fio2 !== undefined) return { fio2: input.fio2, estimated: false };
  if (input.device === 'room_air') return { fio2: ROOM_AIR_FIO2, estimated: false };
  const estimate = estimateFio2(input.device, input.flowLpm ?? null);
  if ('refused' in estimate) return { fio2: null, estimated: false };
  return { fio2: Math.round(estimate.fio2 * 1000) / 1000, estimated: true };
}

function rowFromInput(input: ObsInput, patientId: number, bedId: number | null, userId: number): NewObservation {
  const fio2 = resolveFio2(input);
  return {
    patient_id: patientId,
    bed_id: bedId,
    taken_at: input.takenAt,
    source: 'charted',
    spo2: input.spo2 ?? null,
    heart_rate: input.heartRate ?? null,
    resp_rate: input.respRate ?? null,
    fio2: fio2.fio2,
    fio2_estimated: fio2.estimated,
    device: input.device,
    flow_lpm: input.flowLpm ?? null,
    trace: input.trace,
    perfusion_index: input.perfusionIndex ?? null,
    probe_site: input.probeSite ?? null,
    systolic: input.systolic ?? null,
    temperature: input.temperature ?? null,
    consciousness: input.consciousness ?? null,
    note: input.note ?? null,
    replaces_id: null,
    recorded_by: userId,
  };
}

/**
 * Runs the escalation checks for a patient inside the transaction that stored their readings;
 * other paths that store readings (device feed, imports) call this once per batch and patient.
 */
export async function runObservationHooks(trx: Knex.Transaction, patientId: number, now: Date) {
  // Serialises checks for one patient across instances. Writers should take this lock before
  // inserting readings (see chartObservation) so the lock order is the same everywhere.
  await lockPatient(trx, patientId);
  await checkPatientEscalations(trx, patientId, now);
}

export async function chartObservation(
  user: SessionUser,
  patientId: number,
  input: ObsInput,
  now = new Date(),
): Promise<ObsView> {
  await authorisePatient(user, patientId, 'chart');
  const id = await withTransactionRetry(async (trx) => {
    // Patient row first, always: inserting an obs takes a shared lock on it (foreign key), and
    // taking the exclusive lock only afterwards would let two writers deadlock.
    await lockPatient(trx, patientId);
    // The obs is tied to the bed the patient is in now: it cannot be older than this stay.
    const open = await openStayOfPatient(trx, patientId);
    if (!open) throw new ApiError(409, 'not_admitted', 'This patient has been discharged.');
    if (input.takenAt.getTime() < new Date(open.started_at).getTime() - BEFORE_STAY_SLACK_MS) {
      throw new ApiError(400, 'invalid_input', 'The time taken is before the patient came to this bed.', {
        takenAt: 'Time taken is before the patient came to this bed',
      });
    }
    const row = rowFromInput(input, patientId, open.bed_id, user.id);
    const obsId = await insertObservation(trx, { ...row, recorded_at: now });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'observation.create',
      entity: 'observation',
      entityId: obsId,
      after: row,
      at: now,
    });
    await refreshMinuteRollup(trx, patientId, input.takenAt.getTime(), input.takenAt.getTime());
    await runObservationHooks(trx, patientId, now);
    return obsId;
  });
  return obsView((await findObservation(id))!);
}

async function lockForChange(trx: Knex.Transaction, user: SessionUser, obsId: number): Promise<ObservationRow> {
  const unlocked = await findObservation(obsId, trx);
  if (!unlocked) throw new ApiError(404, 'not_found', 'No obs with that id.');
  await lockPatient(trx, unlocked.patient_id); // same lock order as every other obs writer
  const original = await lockObservation(trx, obsId);
  if (!original) throw new ApiError(404, 'not_found', 'No obs with that id.');
  await authorisePatient(user, original.patient_id, 'chart');
  assertChangeable(user, original, {
    what: 'obs',
    notOwn: 'A nurse corrects their own entries; ask the charge nurse to correct this one.',
  });
  return original;
}

export async function correctObservation(
  user: SessionUser,
  obsId: number,
  reason: string,
  input: ObsInput,
  now = new Date(),
): Promise<ObsView> {
  const id = await withTransactionRetry(async (trx) => {
    const original = await lockForChange(trx, user, obsId);
    if (original.source !== 'charted')
      throw new ApiError(
        409,
        'not_charted',
        'Only charted obs can be corrected; mark a device reading entered in error instead.',
      );
    const row = { ...rowFromInput(input, original.patient_id, original.bed_id, user.id), replaces_id: original.id };
    const newId = await insertObservation(trx, { ...row, recorded_at: now });
    await markObservation(trx, original.id, {
      status: 'superseded',
      status_reason: reason,
      status_by: user.id,
      status_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'observation.correct',
      entity: 'observation',
      entityId: original.id,
      before: original,
      after: { ...row, id: newId, reason },
      at: now,
    });
    const times = [new Date(original.taken_at).getTime(), input.takenAt.getTime()];
    await refreshMinuteRollup(trx, original.patient_id, Math.min(...times), Math.max(...times));
    await runObservationHooks(trx, original.patient_id, now);
    return newId;
  });
  return obsView((await findObservation(id))!);
}

export async function markEnteredInError(
  user: SessionUser,
  obsId: number,
  reason: string,
  now = new Date(),
): Promise<ObsView> {
  await withTransactionRetry(async (trx) => {
    const original = await lockForChange(trx, user, obsId);
    await markObservation(trx, original.id, {
      status: 'entered_in_error',
      status_reason: reason,
      status_by: user.id,
      status_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'observation.entered_in_error',
      entity: 'observation',
      entityId: original.id,
      before: { status: original.status },
      after: { status: 'entered_in_error', reason },
      at: now,
    });
    const at = new Date(original.taken_at).getTime();
    await refreshMinuteRollup(trx, original.patient_id, at, at);
    await runObservationHooks(trx, original.patient_id, now);
  });
  return obsView((await findObservation(obsId))!);
}

export async function listObservations(
  user: SessionUser,
  patientId: number,
  page: number,
  pageSize: number,
  includeDevice: boolean,
): Promise<ObsPage> {
  await authorisePatient(user, patientId, 'read');
  const { rows, total } = await observationPage(
    patientId,
    page,
    pageSize,
    includeDevice ? ['charted', 'device', 'import'] : ['charted'],
  );
  return { items: rows.map(obsView), page, pageSize, total };
}
