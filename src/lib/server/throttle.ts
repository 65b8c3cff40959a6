/** Sign-in throttling per address and per account, counted in MariaDB (see lib/auth/throttle.ts). */
import { ACCOUNT_FAILURES, ACCOUNT_WINDOW_SEC, ADDRESS_FAILURES, ADDRESS_WINDOW_SEC } from '~/lib/auth/throttle.ts';
import { failureCounter } from './queries/rate-limits.ts';

const byAddress = failureCounter('signin-addr', ADDRESS_FAILURES, ADDRESS_WINDOW_SEC);
const byAccount = failureCounter('signin-acct', ACCOUNT_FAILURES, ACCOUNT_WINDOW_SEC);

const accountKey = (email: string) => email.trim().toLowerCase().slice(0, 190);

/** Milliseconds the caller must wait before trying this sign-in, or 0. */
export async function signinBlockedFor(address: string | null, email: string | null): Promise<number> {
  const [a, b] = await Promise.all([
    address ? byAddress.blockedFor(address) : 0,
    email ? byAccount.blockedFor(accountKey(email)) : 0,
  ]);
  return Math.max(a, b);
}

export async function recordSigninFailure(address: string | null, email: string): Promise<void> {
  await Promise.all([address ? byAddress.fail(address) : undefined, byAccount.fail(accountKey(email))]);
}

export async function recordSigninSuccess(email: string): Promise<void> {
  await byAccount.clear(accountKey(email));
}
