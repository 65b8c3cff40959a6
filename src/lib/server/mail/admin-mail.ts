/** What the admin mail page shows: the outbox (always) and, in development, what the SMTP fake received. */
import { recentOutbox } from '~/lib/server/queries/outbox.ts';
import { devMailbox } from './dev-mailbox.ts';

export async function mailOverview(limit = 50) {
  const outbox = (await recentOutbox(limit)).map((r) => ({
    id: Number(r.id),
    key: r.idempotency_key,
    escalationId: r.escalation_id,
    to: r.to_addresses,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    lastError: r.last_error,
    createdAt: new Date(r.created_at).toISOString(),
    sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
    nextAttemptAt: new Date(r.next_attempt_at).toISOString(),
    // Set-password tokens are never shown to administrators (they could otherwise take over the account).
    text: r.text_body.replace(/token=[A-Za-z0-9_-]+/g, 'token=(hidden)'),
  }));
  const dev = await devMailbox(limit);
  // The fake keeps whole messages; mask set-password tokens here too.
  const received =
    dev.received?.map((m) => {
      const msg = m as Record<string, unknown>;
      const mask = (v: unknown) => (typeof v === 'string' ? v.replace(/token=[A-Za-z0-9_-]+/g, 'token=(hidden)') : v);
      return { ...msg, text: mask(msg.text), html: mask(msg.html) };
    }) ?? null;
  return { outbox, received, receivedError: dev.error, smtpFake: dev.enabled };
}
