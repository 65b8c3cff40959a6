/** Reads for the unit report and the handover sheet. */
import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface UnitStayRow {
  patient_id: number;
  bed_id: number;
  bed_label: string;
  started_at: Date;
  ended_at: Date | null;
}

/** Bed stays in a unit's beds that overlap [from, to). */
export async function unitStaysBetween(
  unitId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<UnitStayRow[]> {
  return conn('bed_stays as s')
    .join('beds as b', 'b.id', 's.bed_id')
    .where('b.unit_id', unitId)
    .andWhere('s.started_at', '<', to)
    .andWhere((q) => q.whereNull('s.ended_at').orWhere('s.ended_at', '>', from))
    .orderBy(['s.patient_id', 's.started_at'])
    .select('s.patient_id', 's.bed_id', 'b.label as bed_label', 's.started_at', 's.ended_at');
}

/** One reading as band compliance needs it: [epoch ms, source, SpO₂, trace, perfusion index]. */
export type ComplianceReadingTuple = [
  number,
  'charted' | 'device' | 'import',
  number | null,
  'clean' | 'weak' | 'noisy' | 'absent',
  string | number | null,
];

/**
 * The columns band compliance needs, for one patient's current readings in [from, to), oldest first
 * (the same rows, in the same order, as the bed chart's `currentReadingsBetween`). A 90-day window is
 * ~130,000 rows a patient: rows come as arrays and the time as epoch milliseconds computed by MariaDB
 * (an integer), so no object or Date is built per row.
 */
export async function complianceReadingsBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<ComplianceReadingTuple[]> {
  const rows = await conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .andWhere('taken_at', '>=', from)
    .andWhere('taken_at', '<', to)
    .orderBy('taken_at')
    .orderBy('id')
    .select(
      conn.raw("TIMESTAMPDIFF(MICROSECOND, '1970-01-01 00:00:00', taken_at) DIV 1000 AS t"),
      'source',
      'spo2',
      'trace',
      'perfusion_index',
    )
    .options({ rowsAsArray: true });
  return rows as unknown as ComplianceReadingTuple[];
}

/** Times of current charted obs of many patients in [from, to), by patient then time. */
export async function chartedTimesBetween(
  patientIds: number[],
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<{ patient_id: number; taken_at: Date }[]> {
  if (patientIds.length === 0) return [];
  return conn('observations')
    .whereIn('patient_id', patientIds)
    .andWhere({ source: 'charted', status: 'current' })
    .andWhere('taken_at', '>=', from)
    .andWhere('taken_at', '<', to)
    .orderBy(['patient_id', 'taken_at'])
    .select('patient_id', 'taken_at');
}

export interface OrderLiteRow {
  id: number;
  patient_id: number;
  low: number;
  high: number;
  news2_scale: number;
  ordered_at: Date;
  ordered_by_name: string;
  reason: string;
}

/** Every target order of many patients, oldest first. */
export async function ordersOfPatients(patientIds: number[], conn: Conn = db()): Promise<OrderLiteRow[]> {
  if (patientIds.length === 0) return [];
  return conn('target_orders as o')
    .join('users as u', 'u.id', 'o.ordered_by')
    .whereIn('o.patient_id', patientIds)
    .orderBy(['o.ordered_at', 'o.id'])
    .select(
      'o.id',
      'o.patient_id',
      'o.low',
      'o.high',
      'o.news2_scale',
      'o.ordered_at',
      'u.name as ordered_by_name',
      'o.reason',
    );
}

export interface ReportEscalationRow {
  id: number;
  patient_id: number;
  kind: 'below_band' | 'probe_check' | 'wean_prompt';
  severity: 'standard' | 'urgent' | null;
  state: string;
  raised_at: Date;
  claimed_at: Date | null;
  closed_at: Date | null;
  outcome: string | null;
}

const escalationColumns = [
  'id',
  'patient_id',
  'kind',
  'severity',
  'state',
  'raised_at',
  'claimed_at',
  'closed_at',
  'outcome',
];

/** Escalations of a unit raised in [from, to). */
export async function unitEscalationsRaisedBetween(
  unitId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<ReportEscalationRow[]> {
  return conn('escalations')
    .where('unit_id', unitId)
    .andWhere('raised_at', '>=', from)
    .andWhere('raised_at', '<', to)
    .orderBy('raised_at')
    .select(escalationColumns);
}

/** Escalations of these patients raised since `from`, or still open. */
export async function escalationsForHandover(
  patientIds: number[],
  from: Date,
  conn: Conn = db(),
): Promise<ReportEscalationRow[]> {
  if (patientIds.length === 0) return [];
  return conn('escalations')
    .whereIn('patient_id', patientIds)
    .andWhere((q) => q.where('raised_at', '>=', from).orWhereNot('state', 'closed'))
    .orderBy('raised_at')
    .select(escalationColumns);
}

export interface HandoverReadingRow {
  patient_id: number;
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
  systolic: number | null;
  temperature: string | number | null;
  consciousness: string | null;
}

/** Current readings of many patients in [from, to), by patient then time (the shift's whole record). */
export async function readingsOfPatientsBetween(
  patientIds: number[],
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<HandoverReadingRow[]> {
  if (patientIds.length === 0) return [];
  return conn('observations')
    .whereIn('patient_id', patientIds)
    .andWhere('status', 'current')
    .andWhere('taken_at', '>=', from)
    .andWhere('taken_at', '<', to)
    .orderBy(['patient_id', 'taken_at', 'id'])
    .select(
      'patient_id',
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
      'systolic',
      'temperature',
      'consciousness',
    );
}

/** The newest current charted obs of each patient at or before `at`. */
export async function chartedSetsBefore(
  patientIds: number[],
  at: Date,
  conn: Conn = db(),
): Promise<HandoverReadingRow[]> {
  if (patientIds.length === 0) return [];
  const newest = conn('observations')
    .whereIn('patient_id', patientIds)
    .andWhere({ source: 'charted', status: 'current' })
    .andWhere('taken_at', '<=', at)
    .groupBy('patient_id')
    .select('patient_id')
    .max('taken_at as taken_at')
    .as('m');
  return conn('observations as o')
    .join(newest, (j) => j.on('m.patient_id', 'o.patient_id').andOn('m.taken_at', 'o.taken_at'))
    .where({ 'o.source': 'charted', 'o.status': 'current' })
    .orderBy('o.id')
    .select(
      'o.patient_id',
      'o.taken_at',
      'o.source',
      'o.spo2',
      'o.heart_rate',
      'o.resp_rate',
      'o.fio2',
      'o.fio2_estimated',
      'o.device',
      'o.flow_lpm',
      'o.trace',
      'o.perfusion_index',
      'o.systolic',
      'o.temperature',
      'o.consciousness',
    );
}

/** Open bed assignments of a nurse: the beds they look after now. */
export async function bedsAssignedTo(nurseId: number, conn: Conn = db()): Promise<number[]> {
  const rows = await conn('bed_assignments').where({ nurse_id: nurseId }).whereNull('ended_at').select('bed_id');
  return rows.map((r: { bed_id: number }) => r.bed_id);
}

export interface HandoverNoteRow {
  id: number;
  patient_id: number;
  unit_id: number;
  version: number;
  note: string;
  supersedes_id: number | null;
  written_by: number;
  written_by_name: string;
  written_at: Date;
}

function notesQuery(conn: Conn) {
  return conn('handover_notes as h')
    .join('users as u', 'u.id', 'h.written_by')
    .select('h.*', 'u.name as written_by_name');
}

/** The newest handover note of each patient. */
export async function latestHandoverNotes(patientIds: number[], conn: Conn = db()): Promise<HandoverNoteRow[]> {
  if (patientIds.length === 0) return [];
  const latest = conn('handover_notes')
    .whereIn('patient_id', patientIds)
    .groupBy('patient_id')
    .select('patient_id')
    .max('version as version')
    .as('l');
  return notesQuery(conn).join(latest, (j) => j.on('l.patient_id', 'h.patient_id').andOn('l.version', 'h.version'));
}

/** Every version of a patient's handover note, newest first. */
export async function handoverNotesOf(patientId: number, conn: Conn = db()): Promise<HandoverNoteRow[]> {
  return notesQuery(conn).where('h.patient_id', patientId).orderBy('h.version', 'desc');
}

export async function insertHandoverNote(
  trx: Knex.Transaction,
  row: Omit<HandoverNoteRow, 'id' | 'written_by_name'>,
): Promise<number> {
  const [id] = await trx('handover_notes').insert(row);
  return id;
}
