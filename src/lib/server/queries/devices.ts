import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface DeviceKeyRow {
  id: number;
  bed_id: number;
  label: string;
  key_hash: string;
  key_prefix: string;
  created_by: number | null;
  created_at: Date;
  last_used_at: Date | null;
  revoked_at: Date | null;
  revoked_by: number | null;
  revoke_reason: string | null;
}

export interface DeviceKeyListRow extends Omit<DeviceKeyRow, 'key_hash'> {
  bed_label: string;
  unit_code: string;
  unit_name: string;
  bed_active: number | boolean;
  created_by_name: string | null;
  revoked_by_name: string | null;
}

export async function insertDeviceKey(
  trx: Knex.Transaction,
  row: Pick<DeviceKeyRow, 'bed_id' | 'label' | 'key_hash' | 'key_prefix' | 'created_by' | 'created_at'>,
): Promise<number> {
  const [id] = await trx('device_keys').insert(row);
  return id;
}

function listQuery(conn: Conn) {
  return conn('device_keys as k')
    .join('beds as b', 'b.id', 'k.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .leftJoin('users as cb', 'cb.id', 'k.created_by')
    .leftJoin('users as rb', 'rb.id', 'k.revoked_by')
    .select(
      'k.id',
      'k.bed_id',
      'k.label',
      'k.key_prefix',
      'k.created_by',
      'k.created_at',
      'k.last_used_at',
      'k.revoked_at',
      'k.revoked_by',
      'k.revoke_reason',
      'b.label as bed_label',
      'b.active as bed_active',
      'u.code as unit_code',
      'u.name as unit_name',
      'cb.name as created_by_name',
      'rb.name as revoked_by_name',
    );
}

/** Every key, live ones first, then newest first. */
export async function listDeviceKeys(conn: Conn = db()): Promise<DeviceKeyListRow[]> {
  return listQuery(conn).orderByRaw('k.revoked_at IS NOT NULL').orderBy('k.id', 'desc');
}

export async function findDeviceKeyListRow(id: number, conn: Conn = db()): Promise<DeviceKeyListRow | undefined> {
  return listQuery(conn).where('k.id', id).first();
}

export async function findKeyByHash(
  hash: string,
  conn: Conn = db(),
): Promise<(DeviceKeyRow & { bed_label: string; bed_active: number | boolean }) | undefined> {
  return conn('device_keys as k')
    .join('beds as b', 'b.id', 'k.bed_id')
    .where('k.key_hash', hash)
    .first('k.*', 'b.label as bed_label', 'b.active as bed_active');
}

export async function lockDeviceKey(trx: Knex.Transaction, id: number): Promise<DeviceKeyRow | undefined> {
  return trx<DeviceKeyRow>('device_keys').where({ id }).forUpdate().first();
}

export async function revokeDeviceKey(
  trx: Knex.Transaction,
  id: number,
  fields: { revoked_at: Date; revoked_by: number | null; revoke_reason: string },
): Promise<void> {
  await trx('device_keys').where({ id }).whereNull('revoked_at').update(fields);
}

export async function touchDeviceKey(trx: Conn, id: number, at: Date): Promise<void> {
  await trx('device_keys').where({ id }).update({ last_used_at: at });
}

/** Stays in a bed that overlap [from, to]: who was in the bed when. */
export async function staysInBedBetween(
  conn: Conn,
  bedId: number,
  from: Date,
  to: Date,
): Promise<{ patient_id: number; started_at: Date; ended_at: Date | null }[]> {
  return conn('bed_stays')
    .where({ bed_id: bedId })
    .andWhere('started_at', '<=', to)
    .andWhere((q) => q.whereNull('ended_at').orWhere('ended_at', '>', from))
    .orderBy('started_at')
    .select('patient_id', 'started_at', 'ended_at');
}

export interface DeviceObservationRow {
  patient_id: number;
  bed_id: number;
  taken_at: Date;
  source: 'device';
  spo2: number | null;
  heart_rate: number | null;
  perfusion_index: number | null;
  trace: string;
  recorded_at: Date;
}

/**
 * Stores device readings; a reading whose bed and time are already stored is skipped by the
 * database (unique index on device_bed_id, taken_at). Returns how many rows were new.
 */
export async function insertDeviceReadings(trx: Knex.Transaction, rows: DeviceObservationRow[]): Promise<number> {
  let stored = 0;
  for (let i = 0; i < rows.length; i += 5000) {
    await trx('observations')
      .insert(rows.slice(i, i + 5000))
      .onConflict()
      .ignore();
    // Same connection (the transaction's): rows the last INSERT IGNORE actually added.
    const [[{ n }]] = await trx.raw('SELECT ROW_COUNT() AS n');
    stored += Number(n);
  }
  return stored;
}

/** Every active bed with its unit, for the admin's key form. */
export async function activeBeds(
  conn: Conn = db(),
): Promise<{ id: number; label: string; unit_code: string; unit_name: string }[]> {
  return conn('beds as b')
    .join('units as u', 'u.id', 'b.unit_id')
    .where('b.active', true)
    .orderBy(['u.code', 'b.position'])
    .select('b.id', 'b.label', 'u.code as unit_code', 'u.name as unit_name');
}
