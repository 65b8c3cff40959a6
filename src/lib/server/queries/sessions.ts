/**
 * Server-side session records. The cookie (an Auth.js JWT) carries a random session id; only its
 * SHA-256 is stored, so a copy of this table opens no session. Every request checks its record
 * together with the user (`findActiveSessionUser`), so a revocation holds on every instance at once.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { db } from './db.ts';

export type RevokeReason = 'signout' | 'deactivated' | 'password_changed' | 'admin';

export const hashSessionId = (sid: string) => createHash('sha256').update(sid).digest('hex');

export async function createSession(
  userId: number,
  address: string | null,
  expiresAt: Date,
  trx: Knex | Knex.Transaction = db(),
): Promise<string> {
  const sid = randomBytes(32).toString('base64url');
  await trx('sessions').insert({
    id: hashSessionId(sid),
    user_id: userId,
    expires_at: expiresAt,
    address: address?.slice(0, 64) ?? null,
  });
  return sid;
}

/** Ends one session (sign-out). Returns the user it belonged to, when it was live. */
export async function revokeSession(
  trx: Knex.Transaction,
  sid: string,
  reason: RevokeReason = 'signout',
  at = new Date(),
): Promise<number | null> {
  const id = hashSessionId(sid);
  const row = await trx('sessions').where({ id }).whereNull('revoked_at').forUpdate().first('user_id');
  if (!row) return null;
  await trx('sessions').where({ id }).update({ revoked_at: at, revoked_reason: reason });
  return row.user_id;
}

/**
 * Ends every live session of a user: call it on deactivation and password change (inside the
 * change's transaction when there is one, so both happen or neither). Returns how many ended.
 */
export async function revokeSessionsOf(
  userId: number,
  reason: RevokeReason,
  trx: Knex | Knex.Transaction = db(),
  at = new Date(),
): Promise<number> {
  return trx('sessions')
    .where({ user_id: userId })
    .whereNull('revoked_at')
    .update({ revoked_at: at, revoked_reason: reason });
}
