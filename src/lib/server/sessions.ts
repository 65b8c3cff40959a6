/** Session records behind the cookie: started at sign-in, ended by sign-out (audited with the address). */
import { createSession, revokeSession, revokeSessionsOf } from './queries/sessions.ts';
import { writeAudit } from './queries/audit.ts';
import { withTransactionRetry } from './queries/transaction.ts';

/** One shift; the cookie's own lifetime matches (auth.config.ts). */
export const SESSION_MAX_AGE_SEC = 12 * 60 * 60;

export async function startSession(userId: number, address: string | null, now = new Date()): Promise<string> {
  return createSession(userId, address, new Date(now.getTime() + SESSION_MAX_AGE_SEC * 1000));
}

export async function endSession(sid: string, address: string | null, now = new Date()): Promise<void> {
  await withTransactionRetry(async (trx) => {
    const userId = await revokeSession(trx, sid, 'signout', now);
    if (userId !== null)
      await writeAudit(trx, {
        actorId: userId,
        action: 'signout',
        entity: 'user',
        entityId: userId,
        after: { address },
        at: now,
      });
  });
}

// Deactivation and password changes call this in their own transaction (see queries/sessions.ts).
export { revokeSessionsOf };
