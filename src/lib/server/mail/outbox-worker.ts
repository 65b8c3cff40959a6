/**
 * Delivers the mail outbox. Rows are claimed with SKIP LOCKED so two workers never take the same
 * row; a failed send goes back to pending with a growing delay, so an outage delays mail and
 * loses none. The Message-ID is derived from the row's idempotency key, so even a send repeated
 * after a crash between SMTP and the database is recognisable as the same message.
 */
import { hostname } from 'node:os';
import { randomUUID } from 'node:crypto';
import type { Transporter } from 'nodemailer';
import { retryDelayMs } from '~/lib/escalations/decide.ts';
import { claimDueMail, markRetry, markSent } from '~/lib/server/queries/outbox.ts';
import { isDatabaseUnavailable, isRetryableTransactionError } from '~/lib/server/queries/transaction.ts';
import { mailFrom, mailTransport } from './transport.ts';

export const WORKER_ID = `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
// How long a claim holds before another worker may take the row again (a worker killed mid-send
// leaves its claim behind). Longer than any SMTP send; the tests shorten it (EBB_MAIL_LEASE_MS).
const LEASE_MS = Number(process.env.EBB_MAIL_LEASE_MS ?? 2 * 60_000);

export function messageIdFor(key: string): string {
  return `<${key.replace(/[^A-Za-z0-9._-]/g, '.')}@ebbwatch.invalid>`;
}

export async function deliverDueMail(
  now = new Date(),
  opts: { transport?: Transporter; worker?: string; limit?: number } = {},
): Promise<{ sent: number; failed: number }> {
  const worker = opts.worker ?? WORKER_ID;
  const transport = opts.transport ?? mailTransport();
  const rows = await claimDueMail(worker, now, LEASE_MS, opts.limit ?? 20);
  let sent = 0;
  let failed = 0;
  for (const row of rows) {
    const messageId = messageIdFor(row.idempotency_key);
    try {
      await transport.sendMail({
        from: mailFrom(),
        to: row.to_addresses,
        subject: row.subject,
        text: row.text_body,
        html: row.html_body,
        messageId,
        headers: { 'X-Ebbwatch-Key': row.idempotency_key },
      });
    } catch (err) {
      const base = Number(process.env.EBB_MAIL_RETRY_BASE_MS ?? 10_000);
      await markRetry(
        row.id,
        worker,
        (err as Error).message ?? String(err),
        new Date(Date.now() + retryDelayMs(row.attempts + 1, base)),
      );
      failed += 1;
      continue;
    }
    // The mail has gone. From here a database error must never put the row back to pending (it
    // would be sent again): record "sent" patiently — through a failover, on whichever node the
    // proxy now gives — within the lease.
    await recordSent(row.id, worker, messageId);
    sent += 1;
  }
  return { sent, failed };
}

/**
 * Marks a delivered row sent, re-trying while the database is failing over or busy, for at most
 * half the lease (after that another worker could take the row again, so waiting longer is moot).
 */
export async function recordSent(
  id: number,
  worker: string,
  messageId: string,
  opts: { mark?: typeof markSent; patienceMs?: number } = {},
): Promise<boolean> {
  const mark = opts.mark ?? markSent;
  const until = Date.now() + (opts.patienceMs ?? LEASE_MS / 2);
  for (let attempt = 1; ; attempt++) {
    try {
      await mark(id, worker, messageId, new Date());
      return true;
    } catch (err) {
      const passing = isDatabaseUnavailable(err) || isRetryableTransactionError(err);
      if (!passing || Date.now() >= until) {
        console.error(`[outbox] mail ${id} was delivered but could not be recorded as sent: ${(err as Error).message}`);
        return false;
      }
      await new Promise((r) => setTimeout(r, Math.min(2_000, 50 * attempt)));
    }
  }
}
