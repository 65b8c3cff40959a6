/** The SMTP fake's HTTP side, as tests see it. */
export const FAKE_API = process.env.SMTP_FAKE_API_URL ?? 'http://127.0.0.1:5500';

export interface FakeMessage {
  id: number;
  receivedAt: string;
  messageId: string | null;
  key: string | null;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

export async function received(): Promise<FakeMessage[]> {
  const res = await fetch(`${FAKE_API}/messages`);
  return ((await res.json()) as { messages: FakeMessage[] }).messages;
}

export async function waitForMail(match: (m: FakeMessage) => boolean, timeoutMs = 15_000): Promise<FakeMessage[]> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const found = (await received()).filter(match);
    if (found.length > 0 || Date.now() > until) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
}

export async function smtp(action: 'stop' | 'start'): Promise<void> {
  await fetch(`${FAKE_API}/smtp/${action}`, { method: 'POST' });
}
