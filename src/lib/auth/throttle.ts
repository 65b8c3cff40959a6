/**
 * Sign-in throttling rules (pure numbers; the counters live in MariaDB). Only failures count, so
 * a ward's shared address with many staff signing in is never slowed; a flood of wrong passwords is.
 * These sit beside the per-account lockout (lockout.ts), which still locks after five in a row.
 */
/** Failed sign-ins from one address before it must wait. */
export const ADDRESS_FAILURES = 40;
export const ADDRESS_WINDOW_SEC = 15 * 60;
/** Failed sign-ins for one email (known or not) from any address before it must wait. */
export const ACCOUNT_FAILURES = 10;
export const ACCOUNT_WINDOW_SEC = 60 * 60;

/** Whole seconds for a Retry-After header (never 0: a client must wait at least a second). */
export function retryAfterSeconds(ms: number): number {
  return Math.max(1, Math.ceil(ms / 1000));
}
