/**
 * Sign-in failure counters in MariaDB (rate-limiter-flexible's MySQL store over our Knex pool,
 * table `rate_limits` made by a migration), so every app instance counts the same failures.
 */
import { RateLimiterMySQL } from 'rate-limiter-flexible';
import { db } from './db.ts';

export interface FailureCounter {
  /** Milliseconds until the key may try again, or 0 when it is not blocked. */
  blockedFor(key: string): Promise<number>;
  fail(key: string): Promise<void>;
  clear(key: string): Promise<void>;
}

export function failureCounter(prefix: string, points: number, durationSec: number): FailureCounter {
  let limiter: RateLimiterMySQL | undefined;
  const get = () =>
    (limiter ??= new RateLimiterMySQL({
      storeClient: db(),
      storeType: 'knex',
      dbName: process.env.DB_NAME ?? 'ebbwatch',
      tableName: 'rate_limits',
      tableCreated: true,
      clearExpiredByTimeout: false,
      keyPrefix: prefix,
      points,
      duration: durationSec,
    }));
  return {
    async blockedFor(key) {
      const res = await get().get(key);
      return res && res.consumedPoints >= points ? Math.max(res.msBeforeNext, 1000) : 0;
    },
    async fail(key) {
      try {
        await get().consume(key, 1);
      } catch (err) {
        if (err instanceof Error) throw err; // a RateLimiterRes (over the limit) is the expected rejection
      }
    },
    async clear(key) {
      await get().delete(key);
    },
  };
}
