import type { Knex } from 'knex';
import { db } from './db.ts';
import { correctedRecords } from './corrected-records.ts';
import type { Conn } from './patients.ts';

export interface BloodGasRow {
  id: number;
  patient_id: number;
  bed_id: number | null;
  sampled_at: Date;
  sample_type: 'arterial' | 'venous' | 'capillary';
  ph: string | number;
  pao2_mmhg: string | number;
  paco2_mmhg: string | number;
  entered_unit: 'kPa' | 'mmHg';
  sao2: string | number;
  hco3: string | number | null;
  base_excess: string | number | null;
  lactate: string | number | null;
  hb_gdl: string | number | null;
  fio2: string | number;
  spo2_at_sample: number | null;
  spo2_source: 'entered' | 'nearest_reading' | null;
  note: string | null;
  status: 'current' | 'superseded' | 'entered_in_error';
  replaces_id: number | null;
  status_reason: string | null;
  status_by: number | null;
  status_at: Date | null;
  recorded_by: number | null;
  recorded_at: Date;
}
export interface BloodGasListRow extends BloodGasRow {
  recorded_by_name: string | null;
  status_by_name: string | null;
  replaced_by_id: number | null;
}
export type NewBloodGas = Omit<
  BloodGasRow,
  'id' | 'status' | 'status_reason' | 'status_by' | 'status_at' | 'recorded_at'
> & { recorded_at: Date };

const gases = correctedRecords<BloodGasRow>('blood_gases', 'g');
const listQuery = gases.listQuery;

export const insertBloodGas: (trx: Knex.Transaction, row: NewBloodGas) => Promise<number> = gases.insert;
export const lockBloodGas = gases.lock;
export const markBloodGas = gases.mark;

export async function findBloodGas(id: number, conn: Conn = db()): Promise<BloodGasListRow | undefined> {
  return listQuery(conn).where('g.id', id).first();
}

/** Every blood gas of a patient, newest sample first, every status (at most `limit`). */
export async function bloodGasesOf(patientId: number, limit = 200, conn: Conn = db()): Promise<BloodGasListRow[]> {
  return listQuery(conn)
    .where('g.patient_id', patientId)
    .orderBy('g.sampled_at', 'desc')
    .orderBy('g.id', 'desc')
    .limit(limit);
}

/** Current gases of a patient sampled in [from, to], oldest first (chart marks). */
export async function currentGasesBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<BloodGasRow[]> {
  return conn<BloodGasRow>('blood_gases')
    .where({ patient_id: patientId, status: 'current' })
    .andWhere('sampled_at', '>=', from)
    .andWhere('sampled_at', '<=', to)
    .orderBy('sampled_at')
    .orderBy('id');
}

/** The newest current gas of a patient with a PaCO₂ from an arterial or capillary sample, up to `at`. */
export async function latestCo2Gas(patientId: number, at: Date, conn: Conn = db()): Promise<BloodGasRow | undefined> {
  return conn<BloodGasRow>('blood_gases')
    .where({ patient_id: patientId, status: 'current' })
    .whereIn('sample_type', ['arterial', 'capillary'])
    .andWhere('sampled_at', '<=', at)
    .orderBy('sampled_at', 'desc')
    .orderBy('id', 'desc')
    .first();
}

/**
 * The current SpO₂ reading nearest `at` within ±`withinMs`, for the gas's pair. Trust is judged by
 * the caller (the computation module's rule), so the candidates come back nearest first.
 */
export async function spo2ReadingsNear(patientId: number, at: Date, withinMs: number, conn: Conn = db()) {
  const rows: {
    taken_at: Date;
    spo2: number;
    source: 'charted' | 'device' | 'import';
    trace: 'clean' | 'weak' | 'noisy' | 'absent';
    perfusion_index: string | number | null;
  }[] = await conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .whereNotNull('spo2')
    .andWhere('taken_at', '>=', new Date(at.getTime() - withinMs))
    .andWhere('taken_at', '<=', new Date(at.getTime() + withinMs))
    .select('taken_at', 'spo2', 'source', 'trace', 'perfusion_index');
  return rows.sort(
    (a, b) =>
      Math.abs(new Date(a.taken_at).getTime() - at.getTime()) - Math.abs(new Date(b.taken_at).getTime() - at.getTime()),
  );
}

/** Was the patient in a bed (any stay) at `at`? */
export async function inStayAt(
  patientId: number,
  at: Date,
  conn: Conn = db(),
): Promise<{ bed_id: number } | undefined> {
  return conn('bed_stays')
    .where({ patient_id: patientId })
    .andWhere('started_at', '<=', at)
    .andWhere((q) => q.whereNull('ended_at').orWhere('ended_at', '>=', at))
    .orderBy('started_at', 'desc')
    .first('bed_id');
}

/** The open occult-hypoxaemia escalation of a patient, locked. */
export async function openOccultEscalation(
  trx: Knex.Transaction,
  patientId: number,
): Promise<{ id: number; evidence: unknown } | undefined> {
  return trx('escalations')
    .where({ patient_id: patientId, kind: 'occult_hypoxaemia' })
    .whereNot('state', 'closed')
    .forUpdate()
    .first('id', 'evidence');
}

/** Unit settings of the unit a patient's latest stay is in (gas unit, barometric pressure). */
export async function unitGasSettings(
  patientId: number,
  conn: Conn = db(),
): Promise<{ gas_unit: 'kPa' | 'mmHg' | null; barometric_mmhg: number | null; time_zone: string } | undefined> {
  return conn('bed_stays as s')
    .join('beds as b', 'b.id', 's.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .leftJoin('unit_settings as us', 'us.unit_id', 'u.id')
    .where('s.patient_id', patientId)
    .orderBy('s.started_at', 'desc')
    .orderBy('s.id', 'desc')
    .first('us.gas_unit', 'us.barometric_mmhg', 'u.time_zone');
}
