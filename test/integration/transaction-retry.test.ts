/**
 * withTransactionRetry against a real MariaDB deadlock: two transactions lock two rows in opposite
 * order; InnoDB rolls one back (errno 1213) and the helper runs it again, so both complete.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { createUnit, testDb } from '../support/db.ts';
import { withTransactionRetry } from '../../src/lib/server/queries/transaction.ts';
import { closeDb } from '../../src/lib/server/queries/db.ts';

let db: Knex;
let a: number;
let b: number;
beforeAll(async () => {
  db = testDb();
  a = (await createUnit(db, 0)).unitId;
  b = (await createUnit(db, 0)).unitId;
});
afterAll(async () => {
  await db.destroy();
  await closeDb();
});

describe('withTransactionRetry', () => {
  it('re-runs the transaction that lost a deadlock; both writers finish', async () => {
    let firstLocks = 0;
    let release!: () => void;
    const bothHoldOne = new Promise<void>((r) => {
      release = r;
    });
    const retries: number[] = [];
    const attempts = { one: 0, two: 0 };
    const writer = (name: 'one' | 'two', first: number, second: number) =>
      withTransactionRetry(
        async (trx) => {
          attempts[name] += 1;
          await trx('units').where({ id: first }).forUpdate().first('id');
          if (attempts[name] === 1) {
            if (++firstLocks === 2) release();
            await bothHoldOne; // now each holds one row and asks for the other's
          }
          await trx('units').where({ id: second }).forUpdate().first('id');
          await trx('units')
            .whereIn('id', [first, second])
            .update({ name: trx.raw('name') });
          return name;
        },
        { onRetry: (_n, err) => retries.push((err as { errno?: number }).errno ?? -1) },
      );
    const results = await Promise.all([writer('one', a, b), writer('two', b, a)]);
    expect(results).toEqual(['one', 'two']);
    expect(retries).toEqual([1213]);
    expect(attempts.one + attempts.two).toBe(3);
  });

  it('gives up after the bounded number of tries and passes the error on', async () => {
    let runs = 0;
    const deadlock = Object.assign(new Error('Deadlock found when trying to get lock'), {
      errno: 1213,
      code: 'ER_LOCK_DEADLOCK',
    });
    await expect(
      withTransactionRetry(
        async () => {
          runs += 1;
          throw deadlock;
        },
        { tries: 3, baseDelayMs: 1 },
      ),
    ).rejects.toBe(deadlock);
    expect(runs).toBe(3);
    let other = 0;
    await expect(
      withTransactionRetry(async () => {
        other += 1;
        throw new Error('not retryable');
      }),
    ).rejects.toThrow('not retryable');
    expect(other).toBe(1);
  });
});
