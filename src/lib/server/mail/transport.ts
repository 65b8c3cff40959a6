import nodemailer, { type Transporter } from 'nodemailer';

// One SMTP transport per process. SMTP_URL points at the hospital relay in production and at the
// local SMTP fake (docker-free-scripts/smtp-fake.ts) in development and tests.
let transport: Transporter | undefined;

export function mailTransport(): Transporter {
  transport ??= nodemailer.createTransport(process.env.SMTP_URL ?? 'smtp://127.0.0.1:2525', {
    // Fail fast so an outage turns into a retry, not a stuck worker.
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 10_000,
  } as never);
  return transport;
}

export function mailFrom(): string {
  return process.env.MAIL_FROM ?? 'Ebbwatch <ebbwatch@harbourside.example>';
}
