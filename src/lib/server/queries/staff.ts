/** Staff accounts and set-password links: the SQL behind src/lib/server/staff.ts and passwords.ts. */
import type { Knex } from 'knex';
import type { Role } from '~/lib/auth/roles.ts';

type Trx = Knex.Transaction;

export interface StaffRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  unit_id: number | null;
  unit_code: string | null;
  active: number | boolean;
  must_change_password: number | boolean;
  password_hash: string;
}

export async function lockStaff(trx: Trx, id: number): Promise<StaffRow | undefined> {
  return trx('users as u')
    .leftJoin('units as n', 'n.id', 'u.unit_id')
    .where('u.id', id)
    .forUpdate()
    .first(
      'u.id',
      'u.email',
      'u.name',
      'u.role',
      'u.unit_id',
      'n.code as unit_code',
      'u.active',
      'u.must_change_password',
      'u.password_hash',
    );
}

export async function unitIdByCode(trx: Trx, code: string): Promise<{ id: number; time_zone: string } | undefined> {
  return trx('units').where({ code }).first('id', 'time_zone');
}

export async function unitZoneOf(trx: Trx, unitId: number | null): Promise<string | undefined> {
  if (unitId === null) return undefined;
  return (await trx('units').where({ id: unitId }).first('time_zone'))?.time_zone;
}

export async function insertStaff(
  trx: Trx,
  row: { email: string; name: string; role: Role; unit_id: number | null; password_hash: string; created_at: Date },
): Promise<number> {
  const [id] = await trx('users').insert({ ...row, must_change_password: true });
  return id;
}

export async function updateStaff(trx: Trx, id: number, fields: Record<string, unknown>): Promise<void> {
  await trx('users').where({ id }).update(fields);
}

/** Active administrators, row-locked so two concurrent demotions or deactivations cannot both pass. */
export async function lockActiveAdmins(trx: Trx): Promise<number[]> {
  const rows = await trx('users').where({ role: 'admin', active: true }).orderBy('id').forUpdate().select('id');
  return rows.map((r: { id: number }) => r.id);
}

export interface LinkRow {
  id: number;
  user_id: number;
  purpose: 'invite' | 'reset';
  created_at: Date;
  expires_at: Date;
  used_at: Date | null;
}

export async function insertLink(
  trx: Trx,
  row: {
    user_id: number;
    token_hash: string;
    purpose: 'invite' | 'reset';
    created_by: number;
    created_at: Date;
    expires_at: Date;
  },
): Promise<number> {
  const [id] = await trx('password_links').insert(row);
  return id;
}

/** Ends every still-open link of a user (a newer link, or a password just set, replaces them). */
export async function expireOpenLinks(trx: Trx, userId: number, now: Date): Promise<void> {
  await trx('password_links')
    .where({ user_id: userId })
    .whereNull('used_at')
    .andWhere('expires_at', '>', now)
    .update({ expires_at: now });
}

export async function findLink(conn: Knex | Trx, tokenHash: string, lock = false): Promise<LinkRow | undefined> {
  const q = conn('password_links')
    .where({ token_hash: tokenHash })
    .first('id', 'user_id', 'purpose', 'created_at', 'expires_at', 'used_at');
  return lock ? q.forUpdate() : q;
}

export async function markLinkUsed(trx: Trx, id: number, now: Date): Promise<void> {
  await trx('password_links').where({ id }).update({ used_at: now });
}

export async function setPasswordHash(trx: Trx, id: number, hash: string, now: Date): Promise<void> {
  await trx('users').where({ id }).update({
    password_hash: hash,
    must_change_password: false,
    password_changed_at: now,
    failed_signins: 0,
    locked_until: null,
  });
}

export async function userBasics(
  conn: Knex | Trx,
  id: number,
): Promise<{ id: number; email: string; name: string; active: number | boolean } | undefined> {
  return conn('users').where({ id }).first('id', 'email', 'name', 'active');
}
