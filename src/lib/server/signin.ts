import bcrypt from 'bcryptjs';
import { afterFailedSignin, isLocked } from '~/lib/auth/lockout.ts';
import { updateSigninState, withLockedUser, type UserRow } from './queries/users.ts';

export type SigninOutcome = { kind: 'ok'; user: UserRow } | { kind: 'locked'; until: Date } | { kind: 'wrong' };

// Compared against when the email is unknown, so timing does not reveal which emails exist.
const DUMMY_HASH = '$2b$10$CwTycUXWue0Thq9StjUM0uJ8.2yTq2J4JzQ3e2l0y9D4S1n0nYx2e';

/** Checks a password and keeps the failure count and lock in the database (holds across instances). */
export async function verifyCredentials(email: string, password: string, now: Date): Promise<SigninOutcome> {
  return withLockedUser(email, async (user, trx) => {
    if (!user || !user.active) {
      await bcrypt.compare(password, DUMMY_HASH);
      return { kind: 'wrong' };
    }
    if (isLocked(user.locked_until, now)) return { kind: 'locked', until: user.locked_until! };
    if (await bcrypt.compare(password, user.password_hash)) {
      await updateSigninState(trx, user.id, { failed_signins: 0, locked_until: null, last_signin_at: now });
      return { kind: 'ok', user };
    }
    const next = afterFailedSignin(user.failed_signins, now);
    await updateSigninState(trx, user.id, { failed_signins: next.failed, locked_until: next.lockedUntil });
    return next.lockedUntil ? { kind: 'locked', until: next.lockedUntil } : { kind: 'wrong' };
  });
}
