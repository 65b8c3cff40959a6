import type { Knex } from 'knex';
import { db } from './db.ts';
import { correctedRecords } from './corrected-records.ts';
import type { Conn } from './patients.ts';

export interface ObservationRow {
  id: number;
  patient_id: number;
  bed_id: number | null;
  taken_at: Date;
  source: 'charted' | 'device' | 'import';
  spo2: number | null;
  heart_rate: number | null;
  resp_rate: number | null;
  fio2: string | number | null;
  fio2_estimated: number | boolean;
  device: string | null;
  flow_lpm: string | number | null;
  trace: 'clean' | 'weak' | 'noisy' | 'absent';
  perfusion_index: string | number | null;
  probe_site: string | null;
  systolic: number | null;
  temperature: string | number | null;
  consciousness: string | null;
  note: string | null;
  status: 'current' | 'superseded' | 'entered_in_error' | 'withdrawn';
  replaces_id: number | null;
  status_reason: string | null;
  status_by: number | null;
  status_at: Date | null;
  recorded_by: number | null;
  recorded_at: Date;
}

export interface ObservationListRow extends ObservationRow {
  recorded_by_name: string | null;
  status_by_name: string | null;
  replaced_by_id: number | null;
}

export type NewObservation = Omit<
  ObservationRow,
  'id' | 'status' | 'status_reason' | 'status_by' | 'status_at' | 'recorded_at'
> & { recorded_at?: Date };

const obsRecords = correctedRecords<ObservationRow>('observations', 'o');
const listQuery = obsRecords.listQuery;

export const insertObservation: (trx: Knex.Transaction, row: NewObservation) => Promise<number> = obsRecords.insert;
export const lockObservation = obsRecords.lock;
export const markObservation = obsRecords.mark;

export async function findObservation(id: number, conn: Conn = db()): Promise<ObservationListRow | undefined> {
  return listQuery(conn).where('o.id', id).first();
}

/**
 * One page of a patient's obs record, newest first, every status. `sources` narrows it (the record
 * table shows charted obs and corrections; per-second device rows belong to the chart).
 */
export async function observationPage(
  patientId: number,
  page: number,
  pageSize: number,
  sources: string[],
  conn: Conn = db(),
): Promise<{ rows: ObservationListRow[]; total: number }> {
  const [{ n }] = await conn('observations')
    .where({ patient_id: patientId })
    .whereIn('source', sources)
    .count<{ n: number }[]>({ n: '*' });
  const rows = await listQuery(conn)
    .where('o.patient_id', patientId)
    .whereIn('o.source', sources)
    .orderBy('o.taken_at', 'desc')
    .orderBy('o.id', 'desc')
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { rows, total: Number(n) };
}

export interface ReadingRow {
  taken_at: Date;
  source: 'charted' | 'device' | 'import';
  spo2: number | null;
  heart_rate: number | null;
  resp_rate: number | null;
  fio2: string | number | null;
  fio2_estimated: number | boolean;
  device: string | null;
  flow_lpm: string | number | null;
  trace: 'clean' | 'weak' | 'noisy' | 'absent';
  perfusion_index: string | number | null;
}

/** A charted obs as the NEWS2 input needs it: the reading columns and the vital signs charted with it. */
export interface ChartedObsRow extends ReadingRow {
  systolic: number | null;
  temperature: string | number | null;
  consciousness: string | null;
}

/** Current (not superseded, not in error) readings of a patient in [from, to), oldest first. */
export async function currentReadingsBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<ReadingRow[]> {
  return conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .andWhere('taken_at', '>=', from)
    .andWhere('taken_at', '<', to)
    .orderBy('taken_at')
    .orderBy('id')
    .select(
      'taken_at',
      'source',
      'spo2',
      'heart_rate',
      'resp_rate',
      'fio2',
      'fio2_estimated',
      'device',
      'flow_lpm',
      'trace',
      'perfusion_index',
    );
}

/** The newest current charted obs, or undefined. */
export async function lastChartedObservation(
  patientId: number,
  conn: Conn = db(),
): Promise<ObservationListRow | undefined> {
  return listQuery(conn)
    .where({ 'o.patient_id': patientId, 'o.status': 'current', 'o.source': 'charted' })
    .orderBy('o.taken_at', 'desc')
    .orderBy('o.id', 'desc')
    .first();
}

/** Current charted obs of a patient in [from, to), oldest first (FiO₂ steps and charted marks on long windows). */
export async function chartedReadingsBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<ReadingRow[]> {
  return conn('observations')
    .where({ patient_id: patientId, status: 'current', source: 'charted' })
    .andWhere('taken_at', '>=', from)
    .andWhere('taken_at', '<', to)
    .orderBy('taken_at')
    .orderBy('id')
    .select(
      'taken_at',
      'source',
      'spo2',
      'heart_rate',
      'resp_rate',
      'fio2',
      'fio2_estimated',
      'device',
      'flow_lpm',
      'trace',
      'perfusion_index',
    );
}

/** The newest `limit` current readings with an SpO₂ and a usable trace before `to`, newest first. */
export async function latestSpo2Readings(
  patientId: number,
  to: Date,
  limit: number,
  conn: Conn = db(),
): Promise<ReadingRow[]> {
  return conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .whereNotNull('spo2')
    .whereIn('trace', ['clean', 'weak'])
    .andWhere('taken_at', '<', to)
    .orderBy('taken_at', 'desc')
    .orderBy('id', 'desc')
    .limit(limit)
    .select(
      'taken_at',
      'source',
      'spo2',
      'heart_rate',
      'resp_rate',
      'fio2',
      'fio2_estimated',
      'device',
      'flow_lpm',
      'trace',
      'perfusion_index',
    );
}
