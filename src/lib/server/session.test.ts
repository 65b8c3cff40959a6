import { beforeAll, describe, expect, it } from 'vitest';
import { encode } from '@auth/core/jwt';
import { sessionUserId } from './session.ts';

describe('session cookie reader', () => {
  beforeAll(() => { process.env.AUTH_SECRET = 'unit-test-secret-0123456789abcdef0123456789'; });

  it('reads the user id from a valid Auth.js session token', async () => {
    const token = await encode({ token: { uid: 42, role: 'nurse' }, secret: process.env.AUTH_SECRET!, salt: 'authjs.session-token', maxAge: 3600 });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? token : undefined))).toBe(42);
    // Second read comes from the cache and agrees.
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? token : undefined))).toBe(42);
  });

  it('refuses a token made with another secret, an expired one, or garbage', async () => {
    const other = await encode({ token: { uid: 7 }, secret: 'another-secret-0123456789abcdef0123456789', salt: 'authjs.session-token' });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? other : undefined))).toBeNull();
    const expired = await encode({ token: { uid: 8 }, secret: process.env.AUTH_SECRET!, salt: 'authjs.session-token', maxAge: -120 });
    expect(await sessionUserId((n) => (n === 'authjs.session-token' ? expired : undefined))).toBeNull();
    expect(await sessionUserId(() => 'not-a-token')).toBeNull();
    expect(await sessionUserId(() => undefined)).toBeNull();
  });
});
