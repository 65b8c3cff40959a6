import { beforeAll, describe, expect, it } from 'vitest';
import { encode } from '@auth/core/jwt';
import { readSessionCookie as sessionUserId } from './session.ts';

describe('session cookie reader', () => {
  beforeAll(() => {
    process.env.AUTH_SECRET = 'unit-test-secret-0123456789abcdef0123456789';
  });

  const sid = 'a-session-id-of-enough-length-0123';
  it('reads the user id and session id from a valid Auth.js session token', async () => {
    const token = await encode({
      token: { uid: 42, sid, role: 'nurse' },
      secret: process.env.AUTH_SECRET!,
      salt: 'authjs.session-token',
      maxAge: 3600,
    });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? token : undefined))).toEqual({ uid: 42, sid });
    // Second read comes from the cache and agrees.
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? token : undefined))).toEqual({ uid: 42, sid });
  });

  it('refuses a token without a session id (no server-side record to check)', async () => {
    const token = await encode({
      token: { uid: 42, role: 'nurse' },
      secret: process.env.AUTH_SECRET!,
      salt: 'authjs.session-token',
      maxAge: 3600,
    });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? token : undefined))).toBeNull();
  });

  it('refuses a token made with another secret, an expired one, or garbage', async () => {
    const other = await encode({
      token: { uid: 7, sid },
      secret: 'another-secret-0123456789abcdef0123456789',
      salt: 'authjs.session-token',
    });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? other : undefined))).toBeNull();
    const expired = await encode({
      token: { uid: 8, sid },
      secret: process.env.AUTH_SECRET!,
      salt: 'authjs.session-token',
      maxAge: -120,
    });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? expired : undefined))).toBeNull();
    expect(await sessionUserId(() => 'not-a-token')).toBeNull();
    expect(await sessionUserId(() => undefined)).toBeNull();
  });
});
