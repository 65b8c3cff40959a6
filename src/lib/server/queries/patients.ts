import type { Knex } from 'knex';
import { db } from './db.ts';

export type Conn = Knex | Knex.Transaction;

export interface PatientRow {
  id: number;
  mrn: string;
  given_name: string;
  family_name: string;
  date_of_birth: Date | string;
  co2_retention_risk: number | boolean;
}

export interface StayRow {
  id: number;
  patient_id: number;
  bed_id: number;
  bed_label: string;
  unit_id: number;
  unit_code: string;
  unit_name: string;
  time_zone: string;
  started_at: Date;
  ended_at: Date | null;
  end_reason: 'moved' | 'discharged' | null;
  started_by_name: string | null;
  ended_by_name: string | null;
}

export interface BedRow {
  id: number;
  label: string;
  unit_id: number;
  unit_code: string;
  unit_name: string;
  active: number | boolean;
}

const stayColumns = [
  's.id',
  's.patient_id',
  's.bed_id',
  'b.label as bed_label',
  'u.id as unit_id',
  'u.code as unit_code',
  'u.name as unit_name',
  'u.time_zone',
  's.started_at',
  's.ended_at',
  's.end_reason',
  'sb.name as started_by_name',
  'eb.name as ended_by_name',
];

function staysQuery(conn: Conn) {
  return conn('bed_stays as s')
    .join('beds as b', 'b.id', 's.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .leftJoin('users as sb', 'sb.id', 's.started_by')
    .leftJoin('users as eb', 'eb.id', 's.ended_by');
}

export async function findPatient(id: number, conn: Conn = db()): Promise<PatientRow | undefined> {
  return conn<PatientRow>('patients').where({ id }).first();
}

/** Locks the patient row: serialises writers that depend on the patient's current state. */
export async function lockPatient(trx: Knex.Transaction, id: number): Promise<PatientRow | undefined> {
  return trx<PatientRow>('patients').where({ id }).forUpdate().first();
}

export async function findPatientByMrn(mrn: string, conn: Conn = db()): Promise<PatientRow | undefined> {
  return conn<PatientRow>('patients').where({ mrn }).first();
}

export async function insertPatient(
  trx: Knex.Transaction,
  row: Omit<PatientRow, 'id'> & { created_by: number },
): Promise<number> {
  const [id] = await trx('patients').insert(row);
  return id;
}

/** All stays of a patient, newest first. */
export async function staysOf(patientId: number, conn: Conn = db()): Promise<StayRow[]> {
  return staysQuery(conn)
    .where('s.patient_id', patientId)
    .orderBy('s.started_at', 'desc')
    .orderBy('s.id', 'desc')
    .select(stayColumns);
}

/** The latest stay of each patient (open or not), for lists and access checks. */
export async function latestStays(patientIds: number[], conn: Conn = db()): Promise<StayRow[]> {
  if (patientIds.length === 0) return [];
  const latest = conn('bed_stays')
    .whereIn('patient_id', patientIds)
    .groupBy('patient_id')
    .select('patient_id')
    .max('id as id')
    .as('ls');
  return staysQuery(conn).join(latest, 'ls.id', 's.id').select(stayColumns);
}

export async function openStayOfPatient(
  trx: Knex.Transaction,
  patientId: number,
): Promise<{ id: number; bed_id: number; started_at: Date } | undefined> {
  return trx('bed_stays')
    .where({ patient_id: patientId })
    .whereNull('ended_at')
    .forUpdate()
    .first('id', 'bed_id', 'started_at');
}

/** Locks a bed row: two admissions or moves into one free bed then queue, and the second sees it taken. */
export async function lockBed(trx: Knex.Transaction, bedId: number): Promise<void> {
  await trx('beds').where({ id: bedId }).forUpdate().first('id');
}

export async function openStayInBed(
  trx: Knex.Transaction,
  bedId: number,
): Promise<{ id: number; patient_id: number } | undefined> {
  return trx('bed_stays').where({ bed_id: bedId }).whereNull('ended_at').forUpdate().first('id', 'patient_id');
}

export async function insertStay(
  trx: Knex.Transaction,
  row: { patient_id: number; bed_id: number; started_at: Date; started_by: number },
): Promise<number> {
  const [id] = await trx('bed_stays').insert(row);
  return id;
}

export async function endStay(
  trx: Knex.Transaction,
  id: number,
  fields: { ended_at: Date; end_reason: 'moved' | 'discharged'; ended_by: number },
): Promise<void> {
  await trx('bed_stays').where({ id }).whereNull('ended_at').update(fields);
}

/** Whether a bed still takes patients, under a shared lock (see units-admin retireBed). */
export async function bedIsActive(trx: Knex.Transaction, bedId: number): Promise<boolean> {
  const row = await trx('beds').where({ id: bedId }).forShare().first('active');
  return Boolean(row?.active);
}

export async function findBed(id: number, conn: Conn = db()): Promise<BedRow | undefined> {
  return conn('beds as b')
    .join('units as u', 'u.id', 'b.unit_id')
    .where('b.id', id)
    .first('b.id', 'b.label', 'b.unit_id', 'u.code as unit_code', 'u.name as unit_name', 'b.active');
}

/** Patients whose latest stay is in one of the units; with `admittedOnly`, only those still in a bed. */
export async function patientsInUnits(
  unitIds: number[],
  admittedOnly: boolean,
  conn: Conn = db(),
): Promise<(PatientRow & { stay_id: number })[]> {
  if (unitIds.length === 0) return [];
  const latest = conn('bed_stays').groupBy('patient_id').select('patient_id').max('id as id').as('ls');
  const q = conn('patients as p')
    .join(latest, 'ls.patient_id', 'p.id')
    .join('bed_stays as s', 's.id', 'ls.id')
    .join('beds as b', 'b.id', 's.bed_id')
    .whereIn('b.unit_id', unitIds)
    .orderBy('b.position')
    .select('p.*', 's.id as stay_id');
  if (admittedOnly) q.whereNull('s.ended_at');
  return q;
}

/** Beds of a unit with whether each is free now. */
export async function bedsOfUnit(
  unitId: number,
  conn: Conn = db(),
): Promise<{ id: number; label: string; occupied: boolean }[]> {
  const rows = await conn('beds as b')
    .leftJoin('bed_stays as s', 's.open_bed_id', 'b.id')
    .where({ 'b.unit_id': unitId, 'b.active': true })
    .orderBy('b.position')
    .select('b.id', 'b.label', 's.id as stay_id');
  return rows.map((r) => ({ id: r.id, label: r.label, occupied: r.stay_id !== null }));
}
