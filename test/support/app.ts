/**
 * Talking to the running test app (started by docker-free-scripts/test.sh) as a real client:
 * sign-in through Auth.js's own endpoints, cookies kept per session, Origin sent like a browser.
 */
export const APP_URL = process.env.APP_URL ?? 'http://127.0.0.1:4399';
export const DEMO_PASSWORD = 'ebbwatch-demo';

export class HttpSession {
  private cookies = new Map<string, string>();
  constructor(readonly base = APP_URL) {}

  private remember(res: Response) {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      if (value === '' || /expires=Thu, 01 Jan 1970/i.test(line) || /max-age=0/i.test(line)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  hasSession(): boolean {
    return this.cookies.has('authjs.session-token');
  }

  async request(path: string, init: RequestInit & { json?: unknown } = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set('cookie', this.cookieHeader());
    if (!headers.has('origin') && init.method && init.method !== 'GET')
      headers.set('origin', new URL(this.base).origin);
    let body = init.body;
    if (init.json !== undefined) {
      headers.set('content-type', 'application/json');
      body = JSON.stringify(init.json);
    }
    const res = await fetch(new URL(path, this.base), { ...init, headers, body, redirect: 'manual' });
    this.remember(res);
    return res;
  }

  get(path: string) {
    return this.request(path);
  }

  post(path: string, json?: unknown) {
    return this.request(path, { method: 'POST', json: json ?? {} });
  }

  put(path: string, json: unknown) {
    return this.request(path, { method: 'PUT', json });
  }

  /** Signs in through the credentials callback; returns where Auth.js said to go next. */
  async signIn(email: string, password = DEMO_PASSWORD): Promise<{ ok: boolean; url: string }> {
    const csrfRes = await this.get('/api/auth/csrf');
    const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
    const res = await this.request('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
      body: new URLSearchParams({ csrfToken, email, password, callbackUrl: '/' }).toString(),
    });
    const { url } = (await res.json()) as { url: string };
    return { ok: this.hasSession() && !url.includes('error='), url };
  }
}

export async function signedIn(email: string, password = DEMO_PASSWORD): Promise<HttpSession> {
  const session = new HttpSession();
  const result = await session.signIn(email, password);
  if (!result.ok) throw new Error(`sign-in as ${email} failed: ${result.url}`);
  return session;
}
