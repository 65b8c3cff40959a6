import { revokeSessionsOf, type RevokeReason } from '~/lib/server/queries/sessions.ts';

/**
 * Ends a person's server-side sessions at once (deactivation, a password set through a link).
 * The middleware checks the session record and the active user on every request, so an open page
 * stops working on its next request. A person changing their own password keeps the session they
 * changed it from (the issue asks that the change not sign them out mid-task).
 */
export async function endSessionsOf(userId: number, reason: RevokeReason): Promise<void> {
  await revokeSessionsOf(userId, reason);
}
