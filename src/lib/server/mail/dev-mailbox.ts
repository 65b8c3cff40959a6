/**
 * The seam to the development SMTP fake (docker-free-scripts/smtp-fake.ts): what it received, for
 * the admin mail page. Only `npm start` and the test environment set SMTP_FAKE_API_URL; a
 * production deployment leaves it unset and this reads nothing.
 */
export interface DevMailbox {
  enabled: boolean;
  received: unknown[] | null;
  error: string | null;
}

export async function devMailbox(limit: number, apiUrl = process.env.SMTP_FAKE_API_URL): Promise<DevMailbox> {
  if (!apiUrl) return { enabled: false, received: null, error: null };
  try {
    const res = await fetch(`${apiUrl.replace(/\/$/, '')}/messages`, { signal: AbortSignal.timeout(2_000) });
    return {
      enabled: true,
      received: ((await res.json()) as { messages: unknown[] }).messages.slice(0, limit),
      error: null,
    };
  } catch (err) {
    return {
      enabled: true,
      received: null,
      error: `The development SMTP fake is not answering (${(err as Error).message}).`,
    };
  }
}
