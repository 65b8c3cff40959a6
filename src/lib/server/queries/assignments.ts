import type { Knex } from 'knex';
import { CHARTING_ROLES, type Role } from '~/lib/auth/roles.ts';
import { db } from './db.ts';

export async function openAssignment(
  trx: Knex.Transaction,
  bedId: number,
): Promise<{ id: number; nurse_id: number } | undefined> {
  return trx('bed_assignments').where({ bed_id: bedId }).whereNull('ended_at').forUpdate().first('id', 'nurse_id');
}

export async function endAssignment(trx: Knex.Transaction, id: number, endedBy: number, at: Date): Promise<void> {
  await trx('bed_assignments').where({ id }).whereNull('ended_at').update({ ended_at: at, ended_by: endedBy });
}

export async function insertAssignment(
  trx: Knex.Transaction,
  row: { bed_id: number; nurse_id: number; assigned_by: number; assigned_at: Date },
): Promise<number> {
  const [id] = await trx('bed_assignments').insert(row);
  return id;
}

/** The people a bed can be assigned to: those who chart at the bedside. */
export async function activeNursesOfUnit(unitId: number): Promise<{ id: number; name: string }[]> {
  return db()('users')
    .where({ unit_id: unitId, active: true })
    .whereIn('role', CHARTING_ROLES)
    .orderBy('name')
    .select('id', 'name');
}

export async function findActiveUser(
  id: number,
): Promise<{ id: number; role: Role; unit_id: number | null } | undefined> {
  return db()('users').where({ id, active: true }).first('id', 'role', 'unit_id');
}
