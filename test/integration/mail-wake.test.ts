/** Issue 10 point 12: a transaction that wrote mail wakes this instance's outbox worker when it commits. */
import { afterAll, describe, expect, it } from 'vitest';
import { enqueueMail } from '../../src/lib/server/queries/outbox.ts';
import { closeDb, db } from '../../src/lib/server/queries/db.ts';
import { onMailCommitted } from '../../src/lib/server/mail/wake.ts';
import { unique } from '../support/db.ts';

afterAll(async () => {
  await closeDb();
});

const row = (key: string) => ({
  idempotency_key: key,
  escalation_id: null,
  to_addresses: 'wake@fixture.example',
  subject: 'wake',
  text_body: 'x',
  html_body: '<p>x</p>',
  created_at: new Date(),
});

/** Records each wake-up with whether the row was visible to another connection at that moment. */
function watch(key: string) {
  const seen: boolean[] = [];
  const off = onMailCommitted(() => {
    void db()('mail_outbox')
      .where({ idempotency_key: key })
      .first()
      .then((r) => seen.push(Boolean(r)));
  });
  return { seen, off };
}
const settle = () => new Promise((r) => setTimeout(r, 300));

describe('outbox wake-up after commit', () => {
  it('wakes once the transaction commits, when the row is visible to the worker', async () => {
    const key = unique('wake');
    const w = watch(key);
    let wokenBeforeCommit = false;
    await db().transaction(async (trx) => {
      await enqueueMail(trx, row(key));
      await settle(); // still open: nobody may have been woken yet
      wokenBeforeCommit = w.seen.length > 0;
    });
    await settle();
    w.off();
    expect(wokenBeforeCommit).toBe(false);
    expect(w.seen).toEqual([true]);
  });

  it('a rolled-back transaction wakes nobody', async () => {
    const key = unique('wake');
    const w = watch(key);
    await expect(
      db().transaction(async (trx) => {
        await enqueueMail(trx, row(key));
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    await settle();
    w.off();
    expect(w.seen).toEqual([]);
  });

  it('mail written in a nested transaction waits for the outer commit', async () => {
    const key = unique('wake');
    const w = watch(key);
    let wokenAfterInner = false;
    await db().transaction(async (outer) => {
      await outer.transaction(async (inner) => {
        await enqueueMail(inner, row(key));
      });
      await settle();
      wokenAfterInner = w.seen.length > 0;
    });
    await settle();
    w.off();
    expect(wokenAfterInner).toBe(false);
    expect(w.seen).toEqual([true]);
  });
});
