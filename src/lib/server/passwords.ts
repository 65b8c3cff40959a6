/** Setting a password: through a set-password link (signed out), or by the signed-in person. */
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import bcrypt from 'bcryptjs';
import { passwordProblem } from '~/lib/auth/password-policy.ts';
import { ApiError } from './http.ts';
import { db } from './queries/db.ts';
import { writeAudit } from './queries/audit.ts';
import { expireOpenLinks, findLink, lockStaff, markLinkUsed, setPasswordHash, userBasics } from './queries/staff.ts';
import { hashToken } from './staff.ts';
import { endSessionsOf } from './session-revoke.ts';

export type LinkState = 'ok' | 'expired' | 'used' | 'unknown' | 'inactive';

const LINK_WORDS: Record<Exclude<LinkState, 'ok'>, [number, string]> = {
  unknown: [
    404,
    'This link is not one Ebbwatch sent, or it was copied incompletely. Ask your administrator for a new one.',
  ],
  used: [
    410,
    'This link has already been used. Sign in with the password you chose, or ask your administrator for a new link.',
  ],
  expired: [
    410,
    'This link has expired (links work for 24 hours, and a newer link replaces an older one). Ask your administrator for a new one.',
  ],
  inactive: [410, 'This account is deactivated. Ask your administrator.'],
};

export function linkMessage(state: Exclude<LinkState, 'ok'>): string {
  return LINK_WORDS[state][1];
}

function stateOf(
  link: { used_at: Date | null; expires_at: Date } | undefined,
  active: boolean | undefined,
  now: Date,
): LinkState {
  if (!link) return 'unknown';
  if (link.used_at) return 'used';
  if (new Date(link.expires_at).getTime() <= now.getTime()) return 'expired';
  if (!active) return 'inactive';
  return 'ok';
}

/** What the set-password page says about a token, without using it. */
export async function inspectLink(
  token: string,
  now = new Date(),
): Promise<{ state: LinkState; email?: string; name?: string }> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return { state: 'unknown' };
  const link = await findLink(db(), hashToken(token));
  const user = link ? await userBasics(db(), link.user_id) : undefined;
  const state = stateOf(link, user ? Boolean(user.active) : undefined, now);
  return state === 'ok' ? { state, email: user!.email, name: user!.name } : { state };
}

export async function setPasswordWithLink(token: string, password: string, now = new Date()) {
  const hash = /^[A-Za-z0-9_-]{20,100}$/.test(token) ? hashToken(token) : null;
  const outcome = await withTransactionRetry(async (trx) => {
    const link = hash ? await findLink(trx, hash, true) : undefined;
    const user = link ? await lockStaff(trx, link.user_id) : undefined;
    const state = stateOf(link, user ? Boolean(user.active) : undefined, now);
    if (state !== 'ok') {
      const [status, message] = LINK_WORDS[state];
      throw new ApiError(status, `link_${state}`, message);
    }
    const problem = passwordProblem(password, { email: user!.email, name: user!.name });
    if (problem) throw new ApiError(400, 'invalid_input', `password: ${problem}`, { password: problem });
    await setPasswordHash(trx, user!.id, await bcrypt.hash(password, 10), now);
    await markLinkUsed(trx, link!.id, now);
    await expireOpenLinks(trx, user!.id, now);
    await writeAudit(trx, {
      actorId: user!.id,
      action: 'user.password_set',
      entity: 'user',
      entityId: user!.id,
      after: { via: 'link', linkId: link!.id, purpose: link!.purpose },
      at: now,
    });
    return { userId: user!.id, email: user!.email };
  });
  await endSessionsOf(outcome.userId, 'password_changed');
  return { email: outcome.email };
}

export async function changeOwnPassword(userId: number, current: string, next: string, now = new Date()) {
  await withTransactionRetry(async (trx) => {
    const user = await lockStaff(trx, userId);
    if (!user?.active) throw new ApiError(401, 'unauthenticated', 'Sign in first.');
    if (!(await bcrypt.compare(current, user.password_hash))) {
      throw new ApiError(400, 'invalid_input', 'currentPassword: that is not your current password.', {
        currentPassword: 'Not your current password',
      });
    }
    const problem = passwordProblem(next, { email: user.email, name: user.name });
    if (problem) throw new ApiError(400, 'invalid_input', `newPassword: ${problem}`, { newPassword: problem });
    if (await bcrypt.compare(next, user.password_hash)) {
      throw new ApiError(400, 'invalid_input', 'newPassword: choose a password different from the current one.', {
        newPassword: 'Same as the current password',
      });
    }
    await setPasswordHash(trx, userId, await bcrypt.hash(next, 10), now);
    await expireOpenLinks(trx, userId, now);
    await writeAudit(trx, {
      actorId: userId,
      action: 'user.password_change',
      entity: 'user',
      entityId: userId,
      after: { via: 'account' },
      at: now,
    });
  });
}
