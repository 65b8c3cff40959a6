import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { isDatabaseUnavailable, isDuplicateKey, isRetryableTransactionError } from './transaction.ts';

const sqlError = (errno: number, code: string, sqlMessage = '') =>
  Object.assign(new Error(sqlMessage || code), { errno, code, sqlMessage });

describe('isRetryableTransactionError (the one test for "run the transaction again")', () => {
  it('says yes to deadlock and lock-wait timeout, and to Galera certification / not-ready errors', () => {
    // MariaDB error numbers: 1213 ER_LOCK_DEADLOCK, 1205 ER_LOCK_WAIT_TIMEOUT, 1180 ER_ERROR_DURING_COMMIT,
    // 1047 ER_UNKNOWN_COM_ERROR ("WSREP has not yet prepared node for application use").
    expect(
      isRetryableTransactionError(
        sqlError(1213, 'ER_LOCK_DEADLOCK', 'Deadlock found when trying to get lock; try restarting transaction'),
      ),
    ).toBe(true);
    expect(isRetryableTransactionError(sqlError(1205, 'ER_LOCK_WAIT_TIMEOUT'))).toBe(true);
    expect(isRetryableTransactionError(sqlError(1180, 'ER_ERROR_DURING_COMMIT'))).toBe(true);
    expect(
      isRetryableTransactionError(
        sqlError(1047, 'ER_UNKNOWN_COM_ERROR', 'WSREP has not yet prepared node for application use'),
      ),
    ).toBe(true);
  });
  it('says no to everything else', () => {
    expect(isRetryableTransactionError(sqlError(1062, 'ER_DUP_ENTRY'))).toBe(false);
    expect(isRetryableTransactionError(sqlError(1064, 'ER_PARSE_ERROR'))).toBe(false);
    expect(isRetryableTransactionError(new Error('boom'))).toBe(false);
    expect(isRetryableTransactionError(null)).toBe(false);
  });
});

describe('other database error tests', () => {
  it('duplicate keys, by key name when asked', () => {
    const dup = sqlError(1062, 'ER_DUP_ENTRY', "Duplicate entry 'X' for key 'patients_mrn_unique'");
    expect(isDuplicateKey(dup)).toBe(true);
    expect(isDuplicateKey(dup, 'patients_mrn_unique')).toBe(true);
    expect(isDuplicateKey(dup, 'other')).toBe(false);
  });
  it('database unavailable: refused, lost, timed out waiting for the pool', () => {
    expect(isDatabaseUnavailable(Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' }))).toBe(
      true,
    );
    expect(isDatabaseUnavailable(Object.assign(new Error('lost'), { code: 'PROTOCOL_CONNECTION_LOST' }))).toBe(true);
    expect(
      isDatabaseUnavailable(
        Object.assign(new Error('Knex: Timeout acquiring a connection'), { name: 'KnexTimeoutError' }),
      ),
    ).toBe(true);
    expect(isDatabaseUnavailable(new AggregateError([Object.assign(new Error('x'), { code: 'ECONNREFUSED' })]))).toBe(
      true,
    );
    expect(isDatabaseUnavailable(sqlError(1062, 'ER_DUP_ENTRY'))).toBe(false);
  });

  it('database unavailable: a connection the failover closed under a transaction (seen in the full drill)', () => {
    expect(
      isDatabaseUnavailable(
        Object.assign(new Error("ROLLBACK - Can't add new command when connection is in closed state"), {
          fatal: true,
        }),
      ),
    ).toBe(true);
    expect(isDatabaseUnavailable(new Error("Can't add new command when connection is in closed state"))).toBe(true);
    expect(
      isDatabaseUnavailable(
        Object.assign(new Error('Deadlock found'), { errno: 1213, code: 'ER_LOCK_DEADLOCK', fatal: false }),
      ),
    ).toBe(false);
  });
});

describe('every writer goes through withTransactionRetry', () => {
  it('no module under src/ opens a transaction any other way', () => {
    const src = fileURLToPath(new URL('../../..', import.meta.url));
    const walk = (dir: string): string[] =>
      readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
        e.isDirectory() ? walk(join(dir, e.name)) : /\.(ts|tsx|astro)$/.test(e.name) ? [join(dir, e.name)] : [],
      );
    const offenders = walk(src).filter(
      (f) =>
        !f.endsWith('queries/transaction.ts') &&
        !f.endsWith('.test.ts') &&
        /\.transaction\(/.test(readFileSync(f, 'utf8')),
    );
    expect(offenders).toEqual([]);
  });
});
