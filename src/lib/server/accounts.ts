import { withTransactionRetry } from './queries/transaction.ts';
import { writeAudit } from './queries/audit.ts';
import { unlockUser } from './queries/users.ts';

/** Clears a sign-in lock and records who did it. False when there is no such user. */
export async function unlockAccount(actorId: number, userId: number): Promise<boolean> {
  return withTransactionRetry(async (trx) => {
    const before = await unlockUser(userId, trx);
    if (!before) return false;
    await writeAudit(trx, {
      actorId,
      action: 'user.unlock',
      entity: 'user',
      entityId: userId,
      before,
      after: { failed_signins: 0, locked_until: null },
    });
    return true;
  });
}
