import type { HttpSession } from './app.ts';

/** Signs out through Auth.js's own endpoint, as the header's button does. */
export async function signOut(session: HttpSession): Promise<Response> {
  const { csrfToken } = (await (await session.get('/api/auth/csrf')).json()) as { csrfToken: string };
  return session.request('/api/auth/signout', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
    body: new URLSearchParams({ csrfToken, callbackUrl: '/signin' }).toString(),
  });
}
