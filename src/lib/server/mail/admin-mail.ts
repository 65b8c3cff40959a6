/** What the admin mail page shows: the outbox (always) and, in development, what the SMTP fake received. */
import { recentOutbox } from '~/lib/server/queries/outbox.ts';

export async function mailOverview(limit = 50) {
  const outbox = (await recentOutbox(limit)).map((r) => ({
    id: Number(r.id), key: r.idempotency_key, escalationId: r.escalation_id, to: r.to_addresses, subject: r.subject, status: r.status,
    attempts: r.attempts, lastError: r.last_error, createdAt: new Date(r.created_at).toISOString(), sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
    nextAttemptAt: new Date(r.next_attempt_at).toISOString(),
    // Set-password tokens are never shown to administrators (they could otherwise take over the account).
    text: r.text_body.replace(/token=[A-Za-z0-9_-]+/g, 'token=(hidden)'),
  }));
  const api = process.env.SMTP_FAKE_API_URL;
  let received: unknown[] | null = null;
  let receivedError: string | null = null;
  if (api) {
    try {
      const res = await fetch(`${api.replace(/\/$/, '')}/messages`, { signal: AbortSignal.timeout(2_000) });
      received = ((await res.json()) as { messages: Record<string, unknown>[] }).messages.slice(0, limit).map((m) => ({
        ...m,
        text: typeof m.text === 'string' ? m.text.replace(/token=[A-Za-z0-9_-]+/g, 'token=(hidden)') : m.text,
        html: typeof m.html === 'string' ? m.html.replace(/token=[A-Za-z0-9_-]+/g, 'token=(hidden)') : m.html,
      }));
    } catch (err) {
      receivedError = `The development SMTP fake is not answering (${(err as Error).message}).`;
    }
  }
  return { outbox, received, receivedError, smtpFake: Boolean(api) };
}
