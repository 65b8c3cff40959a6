/**
 * Charting blood gases. As for obs, nothing is deleted: a correction is a new row naming the one it
 * replaces (marked superseded) and "entered in error" marks the row; every write is audited in its
 * transaction, and an occult-hypoxaemia pair raises the bedside task in that same transaction.
 */
import { toIso } from '~/lib/time/iso.ts';
import type { Knex } from 'knex';
import type { BloodGasCreated, BloodGasList, BloodGasView, GasMark, NearestSpo2 } from '~/lib/bloodgas/api-types.ts';
import type { BloodGasInput } from '~/lib/bloodgas/bloodgas-input.ts';
import { deriveGas, gasFlags, runningBias, toMmHg, type GasUnit } from '~/lib/bloodgas/compute.ts';
import { isTrusted } from '~/lib/oxygenation/trust.ts';
import { DEFAULT_UNIT_SETTINGS } from '~/lib/units/settings.ts';
import { ApiError } from '~/lib/server/http.ts';
import { db } from '~/lib/server/queries/db.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  bloodGasesOf,
  currentGasesBetween,
  findBloodGas,
  inStayAt,
  insertBloodGas,
  lockBloodGas,
  markBloodGas,
  spo2ReadingsNear,
  unitGasSettings,
  type BloodGasListRow,
  type BloodGasRow,
  type NewBloodGas,
} from '~/lib/server/queries/blood-gases.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from '~/lib/server/charting/patients.ts';
import { assertChangeable, assertPatientAction, patientPermissions } from '~/lib/server/charting/access.ts';
import { clearOccultHypoxaemia, raiseOccultHypoxaemia } from '~/lib/server/escalations/occult.ts';

/** The SpO₂ of the pair: the nearest trusted reading within this of the sample time. */
export const PAIR_WINDOW_MS = 2 * 60_000;

const num = (v: string | number | null | undefined) => (v === null || v === undefined ? null : Number(v));

async function gasSettings(patientId: number, conn: Knex | Knex.Transaction = db()) {
  const s = await unitGasSettings(patientId, conn);
  return {
    gasUnit: (s?.gas_unit ?? DEFAULT_UNIT_SETTINGS.gasUnit) as GasUnit,
    barometricMmHg: s?.barometric_mmhg ?? DEFAULT_UNIT_SETTINGS.barometricMmHg,
    timeZone: s?.time_zone ?? 'UTC',
  };
}

function forDerivation(r: BloodGasRow) {
  return {
    sampleType: r.sample_type,
    pao2MmHg: Number(r.pao2_mmhg),
    paco2MmHg: Number(r.paco2_mmhg),
    sao2: Number(r.sao2),
    fio2: Number(r.fio2),
    hbGdl: num(r.hb_gdl),
    spo2AtSample: r.spo2_at_sample,
  };
}

export function gasView(r: BloodGasListRow, barometricMmHg: number): BloodGasView {
  const g = forDerivation(r);
  return {
    id: Number(r.id),
    sampledAt: toIso(r.sampled_at)!,
    sampleType: r.sample_type,
    ph: Number(r.ph),
    pao2MmHg: g.pao2MmHg,
    paco2MmHg: g.paco2MmHg,
    enteredUnit: r.entered_unit,
    sao2: g.sao2,
    hco3: num(r.hco3),
    baseExcess: num(r.base_excess),
    lactate: num(r.lactate),
    hbGdl: g.hbGdl,
    fio2: g.fio2,
    spo2AtSample: r.spo2_at_sample,
    spo2Source: r.spo2_source,
    note: r.note,
    status: r.status,
    replacesId: r.replaces_id === null ? null : Number(r.replaces_id),
    replacedById: r.replaced_by_id === null ? null : Number(r.replaced_by_id),
    statusReason: r.status_reason,
    statusBy: r.status_by_name,
    statusAt: toIso(r.status_at),
    recordedBy: r.recorded_by_name,
    recordedAt: toIso(r.recorded_at)!,
    derived: deriveGas(g, barometricMmHg),
    flags: gasFlags(g),
  };
}

/** Nurses and charge nurses of the patient's unit, and intensivists, chart gases while the patient is admitted. */
async function authoriseGasCharting(user: SessionUser, patientId: number) {
  const { patient, stay } = await authorisePatient(user, patientId, 'read');
  const can = patientPermissions(user, stay);
  if (!(can.chart || can.order)) assertPatientAction(user, stay, 'chart');
  return { patient, stay };
}

async function nearestTrustedSpo2(
  patientId: number,
  at: Date,
  conn: Knex | Knex.Transaction = db(),
): Promise<NearestSpo2 | null> {
  for (const r of await spo2ReadingsNear(patientId, at, PAIR_WINDOW_MS, conn)) {
    const reading = {
      at: new Date(r.taken_at).getTime(),
      spo2: Number(r.spo2),
      trace: r.trace,
      perfusionIndex: num(r.perfusion_index),
      source: r.source,
    };
    if (isTrusted(reading)) return { spo2: Number(r.spo2), at: toIso(r.taken_at)!, source: r.source };
  }
  return null;
}

async function rowFromInput(
  trx: Knex.Transaction,
  input: BloodGasInput,
  patientId: number,
  userId: number,
  now: Date,
): Promise<NewBloodGas> {
  const stay = await inStayAt(patientId, input.sampledAt, trx);
  if (!stay)
    throw new ApiError(
      400,
      'invalid_input',
      'The sample time is before admission (or while the patient was not in a bed).',
      { sampledAt: 'Sample time is before admission' },
    );
  let spo2 = input.spo2AtSample ?? null;
  let spo2Source: NewBloodGas['spo2_source'] = spo2 === null ? null : 'entered';
  if (spo2 === null) {
    const near = await nearestTrustedSpo2(patientId, input.sampledAt, trx);
    if (near) {
      spo2 = near.spo2;
      spo2Source = 'nearest_reading';
    }
  }
  const r1 = (v: number) => Math.round(v * 10) / 10;
  return {
    patient_id: patientId,
    bed_id: stay.bed_id,
    sampled_at: input.sampledAt,
    sample_type: input.sampleType,
    ph: input.ph,
    pao2_mmhg: r1(toMmHg(input.pao2, input.gasUnit)),
    paco2_mmhg: r1(toMmHg(input.paco2, input.gasUnit)),
    entered_unit: input.gasUnit,
    sao2: input.sao2,
    hco3: input.hco3 ?? null,
    base_excess: input.baseExcess ?? null,
    lactate: input.lactate ?? null,
    hb_gdl: input.hb ?? null,
    fio2: input.fio2!,
    spo2_at_sample: spo2,
    spo2_source: spo2Source,
    note: input.note ?? null,
    replaces_id: null,
    recorded_by: userId,
    recorded_at: now,
  };
}

async function raiseIfOccult(trx: Knex.Transaction, patientId: number, id: number, row: NewBloodGas, now: Date) {
  const flags = gasFlags({ sampleType: row.sample_type, sao2: Number(row.sao2), spo2AtSample: row.spo2_at_sample });
  if (flags.includes('occult_hypoxaemia')) {
    await raiseOccultHypoxaemia(
      trx,
      patientId,
      {
        bloodGasId: id,
        sampledAt: row.sampled_at.getTime(),
        sao2: Number(row.sao2),
        spo2AtSample: row.spo2_at_sample!,
      },
      now,
    );
  }
}

async function created(id: number, patientId: number): Promise<BloodGasCreated> {
  const { barometricMmHg } = await gasSettings(patientId);
  const view = gasView((await findBloodGas(id))!, barometricMmHg);
  return { bloodGas: view, derived: view.derived, flags: view.flags };
}

export async function chartBloodGas(
  user: SessionUser,
  patientId: number,
  input: BloodGasInput,
  now = new Date(),
): Promise<BloodGasCreated> {
  await authoriseGasCharting(user, patientId);
  const id = await withTransactionRetry(async (trx) => {
    await lockPatient(trx, patientId); // same lock order as every obs writer
    const row = await rowFromInput(trx, input, patientId, user.id, now);
    const gasId = await insertBloodGas(trx, row);
    await writeAudit(trx, {
      actorId: user.id,
      action: 'blood_gas.create',
      entity: 'blood_gas',
      entityId: gasId,
      after: row,
      at: now,
    });
    await raiseIfOccult(trx, patientId, gasId, row, now);
    return gasId;
  });
  return created(id, patientId);
}

async function lockForChange(trx: Knex.Transaction, user: SessionUser, gasId: number): Promise<BloodGasRow> {
  const unlocked = await findBloodGas(gasId, trx);
  if (!unlocked) throw new ApiError(404, 'not_found', 'No blood gas with that id.');
  await authoriseGasCharting(user, unlocked.patient_id);
  await lockPatient(trx, unlocked.patient_id);
  const original = (await lockBloodGas(trx, gasId))!;
  assertChangeable(user, original, {
    what: 'blood gas',
    notOwn: 'You correct your own entries; ask the charge nurse to correct this one.',
  });
  return original;
}

export async function correctBloodGas(
  user: SessionUser,
  gasId: number,
  reason: string,
  input: BloodGasInput,
  now = new Date(),
): Promise<BloodGasCreated> {
  let patientId = 0;
  const id = await withTransactionRetry(async (trx) => {
    const original = await lockForChange(trx, user, gasId);
    patientId = original.patient_id;
    const row = { ...(await rowFromInput(trx, input, original.patient_id, user.id, now)), replaces_id: original.id };
    const newId = await insertBloodGas(trx, row);
    await markBloodGas(trx, original.id, {
      status: 'superseded',
      status_reason: reason,
      status_by: user.id,
      status_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'blood_gas.correct',
      entity: 'blood_gas',
      entityId: original.id,
      before: original,
      after: { ...row, id: newId, reason },
      at: now,
    });
    const stillOccult =
      gasFlags({ sampleType: row.sample_type, sao2: Number(row.sao2), spo2AtSample: row.spo2_at_sample }).length > 0;
    if (!stillOccult)
      await clearOccultHypoxaemia(
        trx,
        original.patient_id,
        original.id,
        'The blood gas that raised it was corrected',
        now,
      );
    await raiseIfOccult(trx, original.patient_id, newId, row, now);
    return newId;
  });
  return created(id, patientId);
}

export async function markGasEnteredInError(
  user: SessionUser,
  gasId: number,
  reason: string,
  now = new Date(),
): Promise<BloodGasView> {
  let patientId = 0;
  await withTransactionRetry(async (trx) => {
    const original = await lockForChange(trx, user, gasId);
    patientId = original.patient_id;
    await markBloodGas(trx, original.id, {
      status: 'entered_in_error',
      status_reason: reason,
      status_by: user.id,
      status_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'blood_gas.entered_in_error',
      entity: 'blood_gas',
      entityId: original.id,
      before: { status: original.status },
      after: { status: 'entered_in_error', reason },
      at: now,
    });
    await clearOccultHypoxaemia(
      trx,
      original.patient_id,
      original.id,
      'The blood gas that raised it was marked entered in error',
      now,
    );
  });
  return (await created(gasId, patientId)).bloodGas;
}

export async function listBloodGases(user: SessionUser, patientId: number): Promise<BloodGasList> {
  await authorisePatient(user, patientId, 'read');
  const [rows, s] = await Promise.all([bloodGasesOf(patientId), gasSettings(patientId)]);
  const views = rows.map((r) => gasView(r, s.barometricMmHg));
  const pairs = views.filter((v) => v.status === 'current' && v.sampleType === 'arterial' && v.spo2AtSample !== null);
  return {
    bloodGases: views,
    gasUnit: s.gasUnit,
    barometricMmHg: s.barometricMmHg,
    timeZone: s.timeZone,
    bias: runningBias(pairs.map((p) => ({ spo2: p.spo2AtSample!, sao2: p.sao2 }))),
    occultCount: pairs.filter((p) => p.flags.includes('occult_hypoxaemia')).length,
  };
}

export async function nearestSpo2For(user: SessionUser, patientId: number, at: Date): Promise<NearestSpo2 | null> {
  await authorisePatient(user, patientId, 'read');
  return nearestTrustedSpo2(patientId, at);
}

/** SaO₂ marks for the chart window (the series API). */
export async function gasMarks(patientId: number, from: Date, to: Date): Promise<GasMark[]> {
  return (await currentGasesBetween(patientId, from, to)).map((r) => ({
    id: Number(r.id),
    t: new Date(r.sampled_at).getTime(),
    sao2: Number(r.sao2),
    spo2AtSample: r.spo2_at_sample,
    sampleType: r.sample_type,
    occult: gasFlags({ sampleType: r.sample_type, sao2: Number(r.sao2), spo2AtSample: r.spo2_at_sample }).length > 0,
  }));
}
