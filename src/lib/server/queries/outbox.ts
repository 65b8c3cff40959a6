import type { Knex } from 'knex';
import { mailCommitted } from '~/lib/server/mail/wake.ts';
import { db } from './db.ts';
import { withTransactionRetry } from './transaction.ts';

export interface OutboxRow {
  id: number;
  idempotency_key: string;
  escalation_id: number | null;
  to_addresses: string;
  subject: string;
  text_body: string;
  html_body: string;
  status: 'pending' | 'sending' | 'sent' | 'failed';
  attempts: number;
  next_attempt_at: Date;
  claimed_until: Date | null;
  claimed_by: string | null;
  last_error: string | null;
  message_id: string | null;
  created_at: Date;
  sent_at: Date | null;
}

/** Idempotent: a second write with the same key is ignored, so a retried transaction never queues a mail twice. */
export async function enqueueMail(
  trx: Knex.Transaction,
  row: {
    idempotency_key: string;
    escalation_id: number | null;
    to_addresses: string;
    subject: string;
    text_body: string;
    html_body: string;
    created_at: Date;
  },
): Promise<void> {
  await trx('mail_outbox')
    .insert({ ...row, next_attempt_at: row.created_at })
    .onConflict('idempotency_key')
    .ignore();
  // Wake this instance's worker once the outermost transaction has committed (never before: the
  // worker would not see the row yet); a rollback wakes nobody.
  outermost(trx).executionPromise.then(
    () => setImmediate(mailCommitted),
    () => {},
  );
}

function outermost(trx: Knex.Transaction): Knex.Transaction {
  let t = trx as Knex.Transaction & { parentTransaction?: Knex.Transaction };
  while (t.parentTransaction) t = t.parentTransaction as typeof t;
  return t;
}

/**
 * Claims due rows for one worker: row locks with SKIP LOCKED, so any number of workers on any
 * number of instances each take different rows. A claim that outlives its lease is taken again.
 */
export async function claimDueMail(worker: string, now: Date, leaseMs: number, limit: number): Promise<OutboxRow[]> {
  return withTransactionRetry(async (trx) => {
    const rows = await trx<OutboxRow>('mail_outbox')
      .where((q) => q.where({ status: 'pending' }).andWhere('next_attempt_at', '<=', now))
      .orWhere((q) => q.where({ status: 'sending' }).andWhere('claimed_until', '<', now))
      .orderBy('id')
      .limit(limit)
      .forUpdate()
      .skipLocked();
    if (rows.length === 0) return [];
    await trx('mail_outbox')
      .whereIn(
        'id',
        rows.map((r) => r.id),
      )
      .update({ status: 'sending', claimed_by: worker, claimed_until: new Date(now.getTime() + leaseMs) });
    return rows;
  });
}

export async function markSent(id: number, worker: string, messageId: string, at: Date): Promise<void> {
  // A set-password link is a secret: in the same statement, a delivered one loses its token from the outbox.
  const scrub = (column: string) =>
    db().raw(
      `IF(idempotency_key LIKE 'password-link:%', REGEXP_REPLACE(??, 'token=[A-Za-z0-9_-]+', 'token=(removed after sending)'), ??)`,
      [column, column],
    );
  await db()('mail_outbox')
    .where({ id, claimed_by: worker, status: 'sending' })
    .update({
      status: 'sent',
      sent_at: at,
      message_id: messageId,
      claimed_until: null,
      attempts: db().raw('attempts + 1'),
      text_body: scrub('text_body'),
      html_body: scrub('html_body'),
    });
}

export async function markRetry(id: number, worker: string, error: string, nextAt: Date): Promise<void> {
  await db()('mail_outbox')
    .where({ id, claimed_by: worker, status: 'sending' })
    .update({
      status: 'pending',
      last_error: error.slice(0, 1000),
      next_attempt_at: nextAt,
      claimed_until: null,
      attempts: db().raw('attempts + 1'),
    });
}

export async function recentOutbox(limit: number): Promise<OutboxRow[]> {
  return db()<OutboxRow>('mail_outbox').orderBy('id', 'desc').limit(limit);
}
