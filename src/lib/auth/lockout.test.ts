import { describe, expect, it } from 'vitest';
import { afterFailedSignin, isLocked, LOCK_MINUTES, MAX_FAILED_SIGNINS } from './lockout.ts';

const now = new Date('2026-12-02T10:00:00Z');

describe('sign-in lockout', () => {
  it('locks at the fifth failure in a row for 15 minutes', () => {
    expect(MAX_FAILED_SIGNINS).toBe(5);
    let failed = 0;
    for (let i = 1; i < 5; i++) {
      const next = afterFailedSignin(failed, now);
      expect(next.lockedUntil).toBeNull();
      failed = next.failed;
    }
    const fifth = afterFailedSignin(failed, now);
    expect(fifth.lockedUntil?.toISOString()).toBe('2026-12-02T10:15:00.000Z');
    expect(LOCK_MINUTES).toBe(15);
  });

  it('is locked only until the lock time passes', () => {
    const until = new Date(now.getTime() + 60_000);
    expect(isLocked(until, now)).toBe(true);
    expect(isLocked(until, new Date(until.getTime()))).toBe(false);
    expect(isLocked(null, now)).toBe(false);
  });
});
