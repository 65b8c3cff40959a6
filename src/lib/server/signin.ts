import bcrypt from 'bcryptjs';
import { afterFailedSignin, isLocked } from '~/lib/auth/lockout.ts';
import { updateSigninState, withLockedUser, type UserRow } from './queries/users.ts';
import { writeAudit } from './queries/audit.ts';
import { recordSigninFailure, recordSigninSuccess } from './throttle.ts';

export type SigninOutcome = { kind: 'ok'; user: UserRow } | { kind: 'locked'; until: Date } | { kind: 'wrong' };

// Compared against when the email is unknown, so timing does not reveal which emails exist.
const DUMMY_HASH = '$2b$10$CwTycUXWue0Thq9StjUM0uJ8.2yTq2J4JzQ3e2l0y9D4S1n0nYx2e';

/**
 * Checks a password and keeps the failure count and lock in the database (holds across instances).
 * Every attempt is audited with the caller's address; failures also feed the throttling counters.
 */
export async function verifyCredentials(
  email: string,
  password: string,
  now: Date,
  address: string | null = null,
): Promise<SigninOutcome> {
  const outcome = await withLockedUser(email, async (user, trx): Promise<SigninOutcome> => {
    const audit = (action: string, after: Record<string, unknown> = {}) =>
      writeAudit(trx, {
        actorId: action === 'signin.ok' ? user!.id : null,
        action,
        entity: 'user',
        entityId: user?.id ?? email.slice(0, 64),
        after: { email, address, ...after },
        at: now,
      });
    if (!user?.active) {
      await bcrypt.compare(password, DUMMY_HASH);
      await audit('signin.failed', { reason: user ? 'inactive' : 'unknown_email' });
      return { kind: 'wrong' };
    }
    if (isLocked(user.locked_until, now)) {
      await audit('signin.failed', { reason: 'locked' });
      return { kind: 'locked', until: user.locked_until! };
    }
    if (await bcrypt.compare(password, user.password_hash)) {
      await updateSigninState(trx, user.id, { failed_signins: 0, locked_until: null, last_signin_at: now });
      await audit('signin.ok');
      return { kind: 'ok', user };
    }
    const next = afterFailedSignin(user.failed_signins, now);
    await updateSigninState(trx, user.id, { failed_signins: next.failed, locked_until: next.lockedUntil });
    await audit('signin.failed', { reason: next.lockedUntil ? 'wrong_password_locked' : 'wrong_password' });
    return next.lockedUntil ? { kind: 'locked', until: next.lockedUntil } : { kind: 'wrong' };
  });
  if (outcome.kind === 'ok') await recordSigninSuccess(email);
  else await recordSigninFailure(address, email);
  return outcome;
}
