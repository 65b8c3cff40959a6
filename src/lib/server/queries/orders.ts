import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface OrderRow {
  id: number;
  patient_id: number;
  low: number;
  high: number;
  news2_scale: 1 | 2;
  preset: string | null;
  reason: string;
  scale_reason: string | null;
  supersedes_id: number | null;
  ordered_by: number;
  ordered_by_name: string;
  ordered_at: Date;
  scale2_basis?: string | null;
}

function ordersQuery(conn: Conn) {
  return conn('target_orders as o')
    .join('users as u', 'u.id', 'o.ordered_by')
    .select('o.*', 'u.name as ordered_by_name');
}

/** Every order of a patient, newest first. */
export async function ordersOf(patientId: number, conn: Conn = db()): Promise<OrderRow[]> {
  return ordersQuery(conn).where('o.patient_id', patientId).orderBy('o.ordered_at', 'desc').orderBy('o.id', 'desc');
}

/** Latest order per patient, for many patients in one query. */
export async function latestOrders(patientIds: number[], conn: Conn = db()): Promise<OrderRow[]> {
  if (patientIds.length === 0) return [];
  const latest = conn('target_orders')
    .whereIn('patient_id', patientIds)
    .groupBy('patient_id')
    .select('patient_id')
    .max('id as id')
    .as('lo');
  return ordersQuery(conn).join(latest, 'lo.id', 'o.id');
}

export async function insertOrder(
  trx: Knex.Transaction,
  row: Omit<OrderRow, 'id' | 'ordered_by_name'>,
): Promise<number> {
  const [id] = await trx('target_orders').insert(row);
  return id;
}
