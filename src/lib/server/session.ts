/**
 * Reads the signed-in user's id from the Auth.js session cookie. Decrypting the JWE costs a key
 * derivation and a decryption, several milliseconds of CPU, on every request a board poller
 * makes; a small per-process cache of token → user id (bounded, and never past the token's own
 * expiry) removes that. Nothing here is needed by another instance: each decrypts for itself, and
 * whether the session still stands is read from MariaDB on every request (queries/sessions.ts).
 */
import { decode } from '@auth/core/jwt';

export const SESSION_COOKIES = ['__Secure-authjs.session-token', 'authjs.session-token'] as const;
const MAX_ENTRIES = 5_000;
const MAX_CACHE_MS = 5 * 60_000;
const cache = new Map<string, SessionRef & { until: number }>();

/** What the cookie names: the user, and the server-side session record (checked per request). */
export interface SessionRef {
  uid: number;
  sid: string;
}

export async function readSessionCookie(cookie: (name: string) => string | undefined): Promise<SessionRef | null> {
  for (const name of SESSION_COOKIES) {
    const token = cookie(name);
    if (!token) continue;
    const now = Date.now();
    const hit = cache.get(token);
    if (hit && hit.until > now) return { uid: hit.uid, sid: hit.sid };
    let payload: Record<string, unknown> | null = null;
    try {
      payload = await decode({ token, secret: process.env.AUTH_SECRET ?? '', salt: name });
    } catch {
      return null; // tampered, expired or from another secret
    }
    const uid = Number(payload?.uid);
    const sid = payload?.sid;
    if (!Number.isInteger(uid) || uid <= 0 || typeof sid !== 'string' || sid.length < 20) return null;
    const exp = typeof payload?.exp === 'number' ? payload.exp * 1000 : now;
    if (cache.size >= MAX_ENTRIES) cache.delete(cache.keys().next().value!);
    cache.set(token, { uid, sid, until: Math.min(exp, now + MAX_CACHE_MS) });
    return { uid, sid };
  }
  return null;
}
