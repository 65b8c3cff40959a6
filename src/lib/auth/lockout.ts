/** Sign-in lockout rule, pure so it is tested without a database. */
export const MAX_FAILED_SIGNINS = 5;
export const LOCK_MINUTES = 15;

export function isLocked(lockedUntil: Date | null, now: Date): boolean {
  return lockedUntil !== null && lockedUntil.getTime() > now.getTime();
}

/** After a wrong password: the new failure count and, at the fifth in a row, when the lock ends. */
export function afterFailedSignin(failedSoFar: number, now: Date): { failed: number; lockedUntil: Date | null } {
  const failed = failedSoFar + 1;
  if (failed >= MAX_FAILED_SIGNINS) return { failed: 0, lockedUntil: new Date(now.getTime() + LOCK_MINUTES * 60_000) };
  return { failed, lockedUntil: null };
}
