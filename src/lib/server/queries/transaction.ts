/**
 * One transaction runner for every writer: it re-runs the whole transaction when the database
 * says the transaction itself lost (a deadlock, a lock-wait timeout, or — on a Galera cluster — a
 * certification failure), a bounded number of times with a short jittered pause. The work must
 * be safe to re-run from the start: everything it wrote was rolled back with the failed attempt.
 */
import type { Knex } from 'knex';
import { db } from './db.ts';

interface SqlError {
  errno?: number;
  code?: string;
  sqlMessage?: string;
  message?: string;
}

// MariaDB / MySQL error numbers that mean "this transaction was rolled back, try it again".
// 1213 ER_LOCK_DEADLOCK, 1205 ER_LOCK_WAIT_TIMEOUT. Galera: a certification conflict reaches the
// client as 1213 too; 1180 ER_ERROR_DURING_COMMIT and 1047 ER_UNKNOWN_COM_ERROR ("WSREP has not yet
// prepared node for application use") arrive while a node rejoins.
const RETRYABLE_ERRNOS = new Set([1213, 1205, 1180, 1047]);
const RETRYABLE_CODES = new Set([
  'ER_LOCK_DEADLOCK',
  'ER_LOCK_WAIT_TIMEOUT',
  'ER_ERROR_DURING_COMMIT',
  'ER_UNKNOWN_COM_ERROR',
]);

/** The one test of "re-run this transaction" (a later Galera setup extends only this). */
export function isRetryableTransactionError(err: unknown): boolean {
  const e = err as SqlError | null;
  if (!e || typeof e !== 'object') return false;
  if (e.errno !== undefined && RETRYABLE_ERRNOS.has(e.errno)) return true;
  if (e.code !== undefined && RETRYABLE_CODES.has(e.code)) return true;
  return /\bWSREP\b.*(deadlock|conflict|not yet prepared)/i.test(e.sqlMessage ?? '');
}

/** A unique key refused the row (1062), optionally naming the key. */
export function isDuplicateKey(err: unknown, key?: string): boolean {
  const e = err as SqlError | null;
  if (!e || (e.errno !== 1062 && e.code !== 'ER_DUP_ENTRY')) return false;
  return key === undefined || (e.sqlMessage ?? e.message ?? '').includes(key);
}

const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_CON_COUNT_ERROR',
  'ER_SERVER_SHUTDOWN',
]);

/** The database did not answer (stopped, restarting, unreachable, pool exhausted waiting for it). */
export function isDatabaseUnavailable(err: unknown): boolean {
  const e = err as (SqlError & { name?: string; errors?: unknown[]; cause?: unknown }) | null;
  if (!e || typeof e !== 'object') return false;
  if (e.name === 'KnexTimeoutError') return true;
  // mysql2 marks errors that end the connection `fatal`; a ROLLBACK on a connection a failover closed
  // says "Can't add new command when connection is in closed state" (seen in the full drill).
  if ((e as { fatal?: boolean }).fatal === true) return true;
  if (/connection is in closed state/i.test(e.message ?? '')) return true;
  if (e.code !== undefined && UNAVAILABLE_CODES.has(e.code)) return true;
  if (
    e.errno === 1053 /* server shutdown in progress */ ||
    e.errno === 2002 ||
    e.errno === 2003 ||
    e.errno === 2006 ||
    e.errno === 2013
  )
    return true;
  if (Array.isArray(e.errors) && e.errors.some(isDatabaseUnavailable)) return true; // AggregateError from a dual-stack connect
  return e.cause !== undefined && e.cause !== err && isDatabaseUnavailable(e.cause);
}

export interface RetryOptions {
  tries?: number;
  baseDelayMs?: number;
  onRetry?: (attempt: number, err: unknown) => void;
}

/** Runs `work` in a transaction, re-running it (up to `tries` attempts in all) when it lost to another. */
export async function withTransactionRetry<T>(
  work: (trx: Knex.Transaction) => Promise<T>,
  opts: RetryOptions = {},
): Promise<T> {
  const tries = opts.tries ?? 4;
  const base = opts.baseDelayMs ?? 15;
  for (let attempt = 1; ; attempt++) {
    try {
      return await db().transaction(work);
    } catch (err) {
      if (attempt >= tries || !isRetryableTransactionError(err)) throw err;
      opts.onRetry?.(attempt, err);
      await new Promise((r) => setTimeout(r, base * attempt + Math.random() * base));
    }
  }
}
