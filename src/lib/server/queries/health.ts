import { db } from './db.ts';

/** True when MariaDB answers a trivial query within the timeout. */
export async function databaseAnswers(timeoutMs = 2000): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      db().raw('select 1'),
      new Promise((_, reject) => {
        timer = setTimeout(() => reject(new Error('timeout')), timeoutMs);
      }),
    ]);
    return true;
  } catch {
    return false;
  } finally {
    clearTimeout(timer); // a load balancer polls this often: leave no timer behind per request
  }
}
