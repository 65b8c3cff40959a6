/** Browser-side JSON helpers for islands: one error type carrying the API's error shape. */
export class ApiClientError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

async function readResponse<T>(res: Response): Promise<T> {
  const body = res.headers.get('content-type')?.includes('application/json') ? await res.json() : null;
  if (!res.ok) {
    const err = body?.error;
    throw new ApiClientError(
      res.status,
      err?.code ?? 'http_error',
      err?.message ?? `Request failed (${res.status})`,
      err?.fields ?? {},
    );
  }
  return body as T;
}

export async function fetchJson<T>(url: string): Promise<T> {
  return readResponse<T>(await fetch(url, { headers: { accept: 'application/json' }, credentials: 'same-origin' }));
}

export async function postJson<T>(url: string, body: unknown, method: 'POST' | 'PUT' | 'PATCH' = 'POST'): Promise<T> {
  return readResponse<T>(
    await fetch(url, {
      method,
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      credentials: 'same-origin',
      body: JSON.stringify(body),
    }),
  );
}

export async function deleteJson<T>(url: string): Promise<T> {
  return readResponse<T>(
    await fetch(url, { method: 'DELETE', headers: { accept: 'application/json' }, credentials: 'same-origin' }),
  );
}
