/** Pleth strip checks: stored verdicts, and the readings a strip may be attached to. */
import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface PlethCheckRow {
  id: number;
  patient_id: number;
  observation_id: number | null;
  file_name: string;
  file_hash: string;
  strip_csv: string;
  sample_rate_hz: string | number;
  verdict: 'trustworthy' | 'doubtful' | 'unusable';
  spo2: string | number | null;
  heart_rate: string | number | null;
  perfusion_index: string | number | null;
  r_median: string | number | null;
  reasons: unknown;
  curve: string;
  note: string | null;
  checked_by: number;
  checked_at: Date;
}

export async function insertPlethCheck(
  trx: Knex.Transaction,
  row: Omit<PlethCheckRow, 'id' | 'reasons'> & { reasons: string },
): Promise<number> {
  const [id] = await trx('pleth_checks').insert(row);
  return id;
}

export async function plethChecksOf(patientId: number, conn: Conn = db()) {
  return conn('pleth_checks as c')
    .join('users as u', 'u.id', 'c.checked_by')
    .leftJoin('observations as o', 'o.id', 'c.observation_id')
    .where('c.patient_id', patientId)
    .orderBy('c.checked_at', 'desc')
    .orderBy('c.id', 'desc')
    .select(
      'c.id',
      'c.patient_id',
      'c.observation_id',
      'c.file_name',
      'c.sample_rate_hz',
      'c.verdict',
      'c.spo2',
      'c.heart_rate',
      'c.perfusion_index',
      'c.r_median',
      'c.reasons',
      'c.curve',
      'c.note',
      'c.checked_at',
      'u.name as checked_by_name',
      'o.taken_at as reading_taken_at',
      'o.spo2 as reading_spo2',
    );
}

export async function observationOfPatient(
  obsId: number,
  patientId: number,
  conn: Conn = db(),
): Promise<{ id: number; taken_at: Date; spo2: number | null } | undefined> {
  return conn('observations').where({ id: obsId, patient_id: patientId }).first('id', 'taken_at', 'spo2');
}

/** Recent readings of a patient a strip can be attached to (device, import and charted). */
export async function attachableReadingsOf(patientId: number, limit: number, conn: Conn = db()) {
  return conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .whereNotNull('spo2')
    .orderBy('taken_at', 'desc')
    .orderBy('id', 'desc')
    .limit(limit)
    .select('id', 'taken_at', 'source', 'spo2', 'trace');
}
