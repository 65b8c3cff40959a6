import { useState } from 'react';
import { usePolled } from '~/lib/client/use-polled.ts';
import { formatDateTimeSeconds } from '~/lib/time/format.ts';

interface OutboxItem {
  id: number;
  key: string;
  to: string;
  subject: string;
  status: string;
  attempts: number;
  lastError: string | null;
  createdAt: string;
  sentAt: string | null;
  nextAttemptAt: string;
  text: string;
}
interface Received {
  id: number;
  receivedAt: string;
  messageId: string | null;
  key: string | null;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}
interface MailOverview {
  outbox: OutboxItem[];
  received: Received[] | null;
  receivedError: string | null;
  smtpFake: boolean;
}

/** The mail outbox, and what the development SMTP fake received — newest first, each mail whole. */
export default function MailBox({ timeZone }: { timeZone: string }) {
  const { data, error } = usePolled<MailOverview>('/api/admin/mail', 10_000);
  const [open, setOpen] = useState<string | null>(null);
  if (error) return <p role="alert">Could not load mail: {(error as Error).message}</p>;
  if (!data) return <p>Loading mail…</p>;
  return (
    <div className="grid gap-6 xl:grid-cols-2">
      <section className="panel">
        <h2 className="mb-2 text-lg font-bold">Outbox</h2>
        <p className="mb-3 text-sm text-ink-600 dark:text-ink-300">
          Every escalation mail is written here with the escalation, then delivered with retries.
        </p>
        <ul className="divide-y divide-ink-100 dark:divide-ink-800" data-testid="outbox">
          {data.outbox.map((m) => (
            <li key={m.id} className="py-2">
              <button
                type="button"
                className="text-left"
                onClick={() => setOpen(open === `o${m.id}` ? null : `o${m.id}`)}
                aria-expanded={open === `o${m.id}`}
              >
                <span className="font-bold">{m.subject}</span>
                <span className="block text-sm text-ink-600 dark:text-ink-300">
                  to {m.to} · {m.status}
                  {m.status === 'sent'
                    ? ` ${formatDateTimeSeconds(m.sentAt!, timeZone)}`
                    : ` · attempts ${m.attempts}${m.lastError ? ` · last error: ${m.lastError}` : ''}`}
                </span>
              </button>
              {open === `o${m.id}` && (
                <pre className="mt-2 whitespace-pre-wrap rounded bg-ink-50 p-2 text-sm dark:bg-ink-950">{m.text}</pre>
              )}
            </li>
          ))}
          {data.outbox.length === 0 && <li className="py-2 text-ink-500">Nothing queued yet.</li>}
        </ul>
      </section>
      <section className="panel">
        <h2 className="mb-2 text-lg font-bold">Received by the development mail server</h2>
        {!data.smtpFake && (
          <p>This installation sends to the hospital's mail relay; there is no local mailbox to show.</p>
        )}
        {data.receivedError && <p role="alert">{data.receivedError}</p>}
        {data.received && (
          <ul className="divide-y divide-ink-100 dark:divide-ink-800" data-testid="received">
            {data.received.map((m) => (
              <li key={m.id} className="py-2">
                <button
                  type="button"
                  className="text-left"
                  onClick={() => setOpen(open === `r${m.id}` ? null : `r${m.id}`)}
                  aria-expanded={open === `r${m.id}`}
                >
                  <span className="font-bold">{m.subject}</span>
                  <span className="block text-sm text-ink-600 dark:text-ink-300">
                    {formatDateTimeSeconds(m.receivedAt, timeZone)} · to {m.to.join(', ')}
                  </span>
                </button>
                {open === `r${m.id}` && (
                  <pre className="mt-2 whitespace-pre-wrap rounded bg-ink-50 p-2 text-sm dark:bg-ink-950">{`From: ${m.from}\nTo: ${m.to.join(', ')}\nMessage-ID: ${m.messageId}\nSubject: ${m.subject}\n\n${m.text}`}</pre>
                )}
              </li>
            ))}
            {data.received.length === 0 && <li className="py-2 text-ink-500">No mail received yet.</li>}
          </ul>
        )}
      </section>
    </div>
  );
}
