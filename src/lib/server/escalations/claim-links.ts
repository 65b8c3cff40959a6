/**
 * One-click claim links for escalation e-mail. A token is signed (HMAC-SHA256 with the app's secret
 * over escalation id, expiry and a random nonce), so a made-up or altered token is refused without a
 * database read; only its SHA-256 is stored, so the table alone claims nothing; it works once
 * (`used_at` set in the same transaction as the claim) and until it expires. Opening the link needs
 * a signed-in user allowed to claim (nurse or charge nurse of the unit, outreach).
 */
import { createHash, createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { Knex } from 'knex';
import { ApiError } from '~/lib/server/http.ts';
import { findClaimToken, insertClaimToken, useClaimToken } from '~/lib/server/queries/claim-tokens.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { claimInTransaction, escalationDetail } from './service.ts';

export const CLAIM_LINK_TTL_MS = Number(process.env.EBB_CLAIM_LINK_TTL_MS ?? 4 * 3_600_000);

const secret = () => {
  const s = process.env.AUTH_SECRET;
  if (!s) throw new Error('AUTH_SECRET is not set: claim links cannot be signed');
  return `claim-link:${s}`;
};
const sign = (payload: string) => createHmac('sha256', secret()).update(payload).digest('base64url');
export const hashClaimToken = (token: string) => createHash('sha256').update(token).digest('hex');

export function publicOrigin(): string {
  return (process.env.PUBLIC_ORIGIN ?? 'http://127.0.0.1:4321').replace(/\/$/, '');
}

/** Makes a token for an escalation inside the caller's transaction (with the mail that carries it). */
export async function issueClaimLink(
  trx: Knex.Transaction,
  escalationId: number,
  now: Date,
): Promise<{ url: string; expiresAt: number }> {
  const expiresAt = now.getTime() + CLAIM_LINK_TTL_MS;
  const payload = `${escalationId}.${Math.floor(expiresAt / 1000)}.${randomBytes(18).toString('base64url')}`;
  const token = `${payload}.${sign(payload)}`;
  await insertClaimToken(trx, {
    escalation_id: escalationId,
    token_hash: hashClaimToken(token),
    created_at: now,
    expires_at: new Date(expiresAt),
  });
  return { url: `${publicOrigin()}/escalations/claim?token=${encodeURIComponent(token)}`, expiresAt };
}

/** Checks the signature and expiry; the escalation id it names, or an ApiError in plain words. */
export function verifyClaimToken(token: string, now: Date): number {
  const parts = token.split('.');
  const bad = new ApiError(
    400,
    'invalid_token',
    'This claim link is not valid. Claim the escalation from the outreach queue instead.',
  );
  if (parts.length !== 4 || !/^\d+$/.test(parts[0]!) || !/^\d+$/.test(parts[1]!)) throw bad;
  const payload = parts.slice(0, 3).join('.');
  const given = Buffer.from(parts[3]!);
  const expected = Buffer.from(sign(payload));
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) throw bad;
  if (Number(parts[1]) * 1000 <= now.getTime())
    throw new ApiError(
      410,
      'expired',
      'This claim link has expired. Claim the escalation from the outreach queue instead.',
    );
  return Number(parts[0]);
}

/** Claims the escalation a link names, for the signed-in user; the token is spent in the same transaction. */
export async function redeemClaimLink(user: SessionUser, token: string, now = new Date()) {
  const escalationId = verifyClaimToken(token, now);
  const row = await findClaimToken(hashClaimToken(token));
  if (!row || row.escalation_id !== escalationId)
    throw new ApiError(
      400,
      'invalid_token',
      'This claim link is not valid. Claim the escalation from the outreach queue instead.',
    );
  if (row.used_at) throw new ApiError(409, 'used', 'This claim link has already been used.');
  await withTransactionRetry(async (trx) => {
    await claimInTransaction(trx, user, escalationId, now, 'e-mail link');
    if (!(await useClaimToken(trx, row.id, user.id, now)))
      throw new ApiError(409, 'used', 'This claim link has already been used.');
  });
  return escalationDetail(user, escalationId);
}
