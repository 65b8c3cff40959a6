import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface ImportRow {
  id: number;
  patient_id: number;
  unit_id: number;
  file_name: string;
  file_hash: string;
  file_bytes: number;
  rows_in_file: number;
  rows_stored: number;
  rows_skipped: number;
  rows_refused: number;
  first_at: Date | null;
  last_at: Date | null;
  mapping: unknown;
  committed_by: number;
  committed_at: Date;
  withdrawn_at: Date | null;
  withdrawn_by: number | null;
  withdraw_reason: string | null;
}
export interface ImportListRow extends ImportRow {
  committed_by_name: string;
  withdrawn_by_name: string | null;
}

function importsQuery(conn: Conn) {
  return conn('observation_imports as i')
    .join('users as cb', 'cb.id', 'i.committed_by')
    .leftJoin('users as wb', 'wb.id', 'i.withdrawn_by')
    .select('i.*', 'cb.name as committed_by_name', 'wb.name as withdrawn_by_name');
}

export async function importsOf(patientId: number, conn: Conn = db()): Promise<ImportListRow[]> {
  return importsQuery(conn).where('i.patient_id', patientId).orderBy('i.committed_at', 'desc').orderBy('i.id', 'desc');
}

export async function findImport(id: number, conn: Conn = db()): Promise<ImportListRow | undefined> {
  return importsQuery(conn).where('i.id', id).first();
}

export async function lockImport(trx: Knex.Transaction, id: number): Promise<ImportRow | undefined> {
  return trx<ImportRow>('observation_imports').where({ id }).forUpdate().first();
}

/** The standing (not withdrawn) import of a file, wherever it went. */
export async function activeImportOfFile(fileHash: string, conn: Conn = db()): Promise<ImportListRow | undefined> {
  return importsQuery(conn).where('i.active_file_hash', fileHash).first();
}

export async function insertImport(
  trx: Knex.Transaction,
  row: Omit<ImportRow, 'id' | 'withdrawn_at' | 'withdrawn_by' | 'withdraw_reason' | 'mapping'> & { mapping: string },
): Promise<number> {
  const [id] = await trx('observation_imports').insert(row);
  return id;
}

export async function markImportWithdrawn(
  trx: Knex.Transaction,
  id: number,
  fields: { withdrawn_at: Date; withdrawn_by: number; withdraw_reason: string },
): Promise<void> {
  await trx('observation_imports').where({ id }).whereNull('withdrawn_at').update(fields);
}

/** Marks an import's readings withdrawn (never deleted); returns how many were marked. */
export async function withdrawImportReadings(
  trx: Knex.Transaction,
  importId: number,
  fields: { status_reason: string; status_by: number; status_at: Date },
): Promise<number> {
  return trx('observations')
    .where({ import_id: importId, status: 'current' })
    .update({ status: 'withdrawn', ...fields });
}

export interface ImportObservationRow {
  patient_id: number;
  bed_id: number | null;
  taken_at: Date;
  source: 'import';
  spo2: number | null;
  heart_rate: number | null;
  perfusion_index: number | null;
  trace: string;
  import_id: number;
  recorded_by: number;
  recorded_at: Date;
}

export async function insertImportReadings(trx: Knex.Transaction, rows: ImportObservationRow[]): Promise<void> {
  for (let i = 0; i < rows.length; i += 5000) await trx('observations').insert(rows.slice(i, i + 5000));
}

/** Whole seconds (epoch) holding a current device or imported reading of the patient in [from, to]. */
export async function readingSecondsBetween(
  patientId: number,
  from: Date,
  to: Date,
  conn: Conn = db(),
): Promise<Set<number>> {
  const rows: { s: number }[] = await conn('observations')
    .where({ patient_id: patientId, status: 'current' })
    .whereIn('source', ['device', 'import'])
    .andWhere('taken_at', '>=', new Date(Math.floor(from.getTime() / 1000) * 1000))
    .andWhere('taken_at', '<', new Date(Math.floor(to.getTime() / 1000) * 1000 + 1000))
    .select(conn.raw("TIMESTAMPDIFF(SECOND, '1970-01-01 00:00:00', taken_at) as s")); // independent of the session time zone
  return new Set(rows.map((r) => Number(r.s)));
}

export async function unitMapping(unitId: number, conn: Conn = db()): Promise<unknown | null> {
  const row = await conn('import_mappings').where({ unit_id: unitId }).first('mapping');
  if (!row) return null;
  return typeof row.mapping === 'string' ? JSON.parse(row.mapping) : row.mapping;
}

export async function saveUnitMapping(
  trx: Knex.Transaction,
  unitId: number,
  mapping: unknown,
  userId: number,
  at: Date,
): Promise<void> {
  await trx('import_mappings')
    .insert({ unit_id: unitId, mapping: JSON.stringify(mapping), updated_by: userId, updated_at: at })
    .onConflict('unit_id')
    .merge(['mapping', 'updated_by', 'updated_at']);
}
