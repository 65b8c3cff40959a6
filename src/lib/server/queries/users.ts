import type { Knex } from 'knex';
import { db } from './db.ts';
import { withTransactionRetry } from './transaction.ts';
import { hashSessionId } from './sessions.ts';
import type { Role } from '~/lib/auth/roles.ts';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  unit_id: number | null;
  password_hash: string;
  active: number | boolean;
  failed_signins: number;
  locked_until: Date | null;
  last_signin_at: Date | null;
}

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  unitId: number | null;
  unitCode: string | null;
  unitName: string | null;
  /** Set for new accounts and after an admin reset: every page but My account waits for a new password. */
  mustChangePassword?: boolean;
}

export async function findUserByEmail(
  email: string,
  trx: Knex | Knex.Transaction = db(),
): Promise<UserRow | undefined> {
  return trx<UserRow>('users').where({ email: email.toLowerCase() }).first();
}

/**
 * The signed-in user as the app sees them, or undefined when the account is missing or
 * deactivated, or the session record behind the cookie is unknown, revoked or expired.
 */
export async function findActiveSessionUser(id: number, sid: string): Promise<SessionUser | undefined> {
  const row = await db()('users as u')
    .join('sessions as s', 's.user_id', 'u.id')
    .leftJoin('units as n', 'n.id', 'u.unit_id')
    .where({ 'u.id': id, 'u.active': true, 's.id': hashSessionId(sid) })
    .whereNull('s.revoked_at')
    .where('s.expires_at', '>', new Date())
    .first(
      'u.id',
      'u.email',
      'u.name',
      'u.role',
      'u.unit_id',
      'n.code as unit_code',
      'n.name as unit_name',
      'u.must_change_password',
    );
  if (!row) return undefined;
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    unitId: row.unit_id,
    unitCode: row.unit_code ?? null,
    unitName: row.unit_name ?? null,
    mustChangePassword: Boolean(row.must_change_password),
  };
}

/**
 * Runs `decide` on the user's row under a row lock, so concurrent sign-ins on any number of app
 * instances count failures exactly once each.
 */
export async function withLockedUser<T>(
  email: string,
  decide: (user: UserRow | undefined, trx: Knex.Transaction) => Promise<T>,
): Promise<T> {
  return withTransactionRetry(async (trx) => {
    const user = await trx<UserRow>('users').where({ email: email.toLowerCase() }).forUpdate().first();
    return decide(user, trx);
  });
}

export async function updateSigninState(
  trx: Knex.Transaction,
  id: number,
  fields: Partial<Pick<UserRow, 'failed_signins' | 'locked_until' | 'last_signin_at'>>,
): Promise<void> {
  await trx('users').where({ id }).update(fields);
}

export interface UserListRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  unit_code: string | null;
  active: boolean;
  failed_signins: number;
  locked_until: Date | null;
  last_signin_at: Date | null;
  must_change_password: boolean;
  password_changed_at: Date | null;
  deactivated_at: Date | null;
  created_at: Date;
}

export async function listUsers(): Promise<UserListRow[]> {
  const rows = await db()('users as u')
    .leftJoin('units as n', 'n.id', 'u.unit_id')
    .orderBy([{ column: 'u.role' }, { column: 'u.name' }])
    .select(
      'u.id',
      'u.email',
      'u.name',
      'u.role',
      'n.code as unit_code',
      'u.active',
      'u.failed_signins',
      'u.locked_until',
      'u.last_signin_at',
      'u.must_change_password',
      'u.password_changed_at',
      'u.deactivated_at',
      'u.created_at',
    );
  return rows.map((r) => ({ ...r, active: Boolean(r.active), must_change_password: Boolean(r.must_change_password) }));
}

/** Clears a lockout; returns the row as it was, or undefined when there is no such user. */
export async function unlockUser(
  id: number,
  trx: Knex.Transaction,
): Promise<Pick<UserRow, 'failed_signins' | 'locked_until'> | undefined> {
  const before = await trx<UserRow>('users').where({ id }).forUpdate().first('failed_signins', 'locked_until');
  if (!before) return undefined;
  await trx('users').where({ id }).update({ failed_signins: 0, locked_until: null });
  return before;
}
