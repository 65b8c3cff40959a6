/**
 * The local SMTP fake for development and tests (never production): an smtp-server on loopback
 * that keeps every message it receives (in var/, so a restart loses nothing) and shows them over a
 * small HTTP API, which the admin mail page reads. The SMTP side can be stopped and started over
 * HTTP so tests can play a mail server outage.
 *
 *   SMTP_FAKE_PORT (2525)  SMTP_FAKE_HTTP_PORT (2580)  SMTP_FAKE_DIR (var/smtp-fake)
 *   GET /messages · GET /health · POST /smtp/stop · POST /smtp/start
 */
import { createServer } from 'node:http';
import { appendFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';

const smtpPort = Number(process.env.SMTP_FAKE_PORT ?? 2525);
const httpPort = Number(process.env.SMTP_FAKE_HTTP_PORT ?? 2580);
const dir = process.env.SMTP_FAKE_DIR ?? 'var/smtp-fake';
const store = join(dir, 'messages.jsonl');

interface Stored {
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

mkdirSync(dir, { recursive: true });
const messages: Stored[] = existsSync(store)
  ? readFileSync(store, 'utf8')
      .split('\n')
      .filter(Boolean)
      .map((line) => JSON.parse(line) as Stored)
  : [];

let smtp: SMTPServer | null = null;

function startSmtp(): Promise<void> {
  if (smtp) return Promise.resolve();
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Ebbwatch development SMTP fake',
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const stored: Stored = {
            id: messages.length + 1,
            receivedAt: new Date().toISOString(),
            messageId: mail.messageId ?? null,
            key: (mail.headers.get('x-ebbwatch-key') as string | undefined) ?? null,
            from: mail.from?.text ?? '',
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : '',
          };
          messages.push(stored);
          appendFileSync(store, `${JSON.stringify(stored)}\n`);
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(smtpPort, '127.0.0.1', () => {
      smtp = server;
      resolve();
    });
  });
}

function stopSmtp(): Promise<void> {
  const server = smtp;
  smtp = null;
  if (!server) return Promise.resolve();
  return new Promise((resolve) => server.close(() => resolve()));
}

const http = createServer(async (req, res) => {
  const send = (status: number, body: unknown) => {
    res.writeHead(status, { 'content-type': 'application/json' });
    res.end(JSON.stringify(body));
  };
  try {
    if (req.method === 'GET' && req.url === '/messages') return send(200, { messages: [...messages].reverse() });
    if (req.method === 'GET' && req.url === '/health')
      return send(200, { smtp: smtp ? 'listening' : 'stopped', received: messages.length });
    if (req.method === 'POST' && req.url === '/smtp/stop') {
      await stopSmtp();
      return send(200, { smtp: 'stopped' });
    }
    if (req.method === 'POST' && req.url === '/smtp/start') {
      await startSmtp();
      return send(200, { smtp: 'listening' });
    }
    send(404, { error: 'not found' });
  } catch (err) {
    send(500, { error: (err as Error).message });
  }
});

await startSmtp();
http.listen(httpPort, '127.0.0.1', () => {
  console.log(`[smtp-fake] SMTP on 127.0.0.1:${smtpPort}, messages at http://127.0.0.1:${httpPort}/messages`);
});
const shutdown = () => {
  void stopSmtp();
  http.close();
  process.exit(0);
};
process.on('SIGTERM', shutdown);
process.on('SIGINT', shutdown);
