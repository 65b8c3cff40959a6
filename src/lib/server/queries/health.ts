import { db } from './db.ts';

/** True when MariaDB answers a trivial query within the timeout. */
export async function databaseAnswers(timeoutMs = 2000): Promise<boolean> {
  try {
    await Promise.race([
      db().raw('select 1'),
      new Promise((_, reject) => setTimeout(() => reject(new Error('timeout')), timeoutMs).unref()),
    ]);
    return true;
  } catch {
    return false;
  }
}
