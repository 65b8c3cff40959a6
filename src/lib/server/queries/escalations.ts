import type { Knex } from 'knex';
import { db } from './db.ts';
import type { EscalationKind } from '~/lib/escalations/decide.ts';

export interface EscalationRow {
  id: number;
  patient_id: number;
  unit_id: number;
  bed_id: number | null;
  kind: EscalationKind;
  severity: 'standard' | 'urgent' | null;
  state: 'raised' | 'claimed' | 'closed';
  raised_at: Date;
  run_start: Date;
  run_end: Date;
  evidence: unknown;
  claimed_by: number | null;
  claimed_at: Date | null;
  closed_by: number | null;
  closed_at: Date | null;
  outcome: string | null;
  close_note: string | null;
  last_notified_at: Date | null;
  notify_count: number;
  back_in_band_at: Date | null;
}

export interface EscalationListRow extends EscalationRow {
  unit_code: string;
  unit_name: string;
  unit_time_zone: string;
  bed_label: string | null;
  given_name: string;
  family_name: string;
  mrn: string;
  claimed_by_name: string | null;
  closed_by_name: string | null;
}

export async function openEscalationsOf(trx: Knex.Transaction, patientId: number): Promise<EscalationRow[]> {
  return trx<EscalationRow>('escalations').where({ patient_id: patientId }).whereNot('state', 'closed').forUpdate();
}

export async function insertEscalation(
  trx: Knex.Transaction,
  row: Omit<
    EscalationRow,
    | 'id'
    | 'claimed_by'
    | 'claimed_at'
    | 'closed_by'
    | 'closed_at'
    | 'outcome'
    | 'close_note'
    | 'back_in_band_at'
    | 'evidence'
  > & { evidence: string },
): Promise<number> {
  const [id] = await trx('escalations').insert(row);
  return id;
}

export async function updateEscalation(
  trx: Knex.Transaction,
  id: number,
  fields: Partial<Omit<EscalationRow, 'id'>>,
): Promise<void> {
  await trx('escalations').where({ id }).update(fields);
}

export async function insertEvent(
  trx: Knex.Transaction,
  row: { escalation_id: number; type: string; actor_id: number | null; at: Date; detail?: unknown },
): Promise<void> {
  await trx('escalation_events').insert({
    ...row,
    detail: row.detail === undefined ? null : JSON.stringify(row.detail),
  });
}

export async function lockEscalation(trx: Knex.Transaction, id: number): Promise<EscalationRow | undefined> {
  return trx<EscalationRow>('escalations').where({ id }).forUpdate().first();
}

function listQuery(conn: Knex | Knex.Transaction) {
  return conn('escalations as e')
    .join('units as u', 'u.id', 'e.unit_id')
    .leftJoin('beds as b', 'b.id', 'e.bed_id')
    .join('patients as p', 'p.id', 'e.patient_id')
    .leftJoin('users as cb', 'cb.id', 'e.claimed_by')
    .leftJoin('users as xb', 'xb.id', 'e.closed_by')
    .select(
      'e.*',
      'u.code as unit_code',
      'u.name as unit_name',
      'u.time_zone as unit_time_zone',
      'b.label as bed_label',
      'p.given_name',
      'p.family_name',
      'p.mrn',
      'cb.name as claimed_by_name',
      'xb.name as closed_by_name',
    );
}

export async function listEscalations(filter: {
  unitIds: number[];
  open: boolean;
  kinds?: EscalationKind[];
  patientId?: number;
  limit: number;
  closedSince?: Date;
}): Promise<EscalationListRow[]> {
  const q = listQuery(db())
    .whereIn('e.unit_id', filter.unitIds)
    .orderBy('e.raised_at', filter.open ? 'asc' : 'desc')
    .limit(filter.limit);
  if (filter.open) q.whereNot('e.state', 'closed');
  else q.where('e.state', 'closed');
  if (filter.kinds) q.whereIn('e.kind', filter.kinds);
  if (filter.patientId) q.where('e.patient_id', filter.patientId);
  if (filter.closedSince) q.where('e.closed_at', '>=', filter.closedSince);
  return q;
}

export async function findEscalation(id: number): Promise<EscalationListRow | undefined> {
  return listQuery(db()).where('e.id', id).first();
}

export async function eventsOf(escalationId: number) {
  return db()('escalation_events as v')
    .leftJoin('users as a', 'a.id', 'v.actor_id')
    .where('v.escalation_id', escalationId)
    .orderBy('v.id')
    .select('v.id', 'v.type', 'v.at', 'v.detail', 'a.name as actor_name');
}

/** Escalations of one patient touching a window, for the bed chart's marks. */
export async function escalationsInWindow(patientId: number, from: Date): Promise<EscalationRow[]> {
  return db()<EscalationRow>('escalations')
    .where({ patient_id: patientId })
    .andWhere((q) => q.whereNull('closed_at').orWhere('closed_at', '>=', from))
    .orderBy('raised_at');
}

/** The open escalation that matters most per patient (urgent below band first), for board tiles. */
export async function openForPatients(
  patientIds: number[],
): Promise<(EscalationRow & { claimed_by_name: string | null })[]> {
  if (patientIds.length === 0) return [];
  return db()('escalations as e')
    .leftJoin('users as c', 'c.id', 'e.claimed_by')
    .whereIn('e.patient_id', patientIds)
    .whereNot('e.state', 'closed')
    .select('e.*', 'c.name as claimed_by_name');
}

/** Raised (unclaimed) e-mailed escalations, claimed row by row so two instances never both re-notify. */
export async function lockUnclaimedForRenotify(
  trx: Knex.Transaction,
  onlyUnitId?: number,
  limit = 50,
  lastNoticeBefore?: Date,
): Promise<EscalationRow[]> {
  const q = trx<EscalationRow>('escalations')
    .where({ state: 'raised', kind: 'below_band' })
    .orderBy('id')
    .limit(limit)
    .forUpdate()
    .skipLocked();
  // Lock only rows that could be due: a row not due is left alone for other callers (SKIP LOCKED would hide it from them).
  if (lastNoticeBefore) q.whereRaw('COALESCE(last_notified_at, raised_at) <= ?', [lastNoticeBefore]);
  return onlyUnitId === undefined ? q : q.where('unit_id', onlyUnitId);
}

/** Patients the sweep should look at: in a bed now, with recent readings or an open escalation. */
export async function patientsToSweep(since: Date): Promise<number[]> {
  const k = db();
  const recent = k('observations').where('taken_at', '>=', since).distinct('patient_id');
  const open = k('escalations').whereNot('state', 'closed').distinct('patient_id');
  return k('bed_stays')
    .whereNull('ended_at')
    .andWhere((q) => q.whereIn('patient_id', recent).orWhereIn('patient_id', open))
    .pluck('patient_id');
}

/** Takes the patient's row lock unless another instance holds it; false means skip this round. */
export async function tryLockPatient(trx: Knex.Transaction, patientId: number): Promise<boolean> {
  const row = await trx('patients').where({ id: patientId }).forUpdate().skipLocked().first('id');
  return row !== undefined;
}

/** Run start of the newest closed escalation of each kind, for many patients in one query. */
export async function lastClosedRunStartsFor(
  patientIds: number[],
  conn: Knex | Knex.Transaction = db(),
): Promise<{ patient_id: number; kind: EscalationKind; run_start: Date }[]> {
  if (patientIds.length === 0) return [];
  return conn('escalations')
    .whereIn('patient_id', patientIds)
    .andWhere('state', 'closed')
    .groupBy('patient_id', 'kind')
    .select('patient_id', 'kind')
    .max('run_start as run_start');
}
