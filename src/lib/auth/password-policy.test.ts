import { describe, expect, it } from 'vitest';
import { isCommonPassword, passwordProblem, passwordStrength, PASSWORD_MIN } from './password-policy.ts';

// Rules from NIST SP 800-63B §5.1.1.2 (memorized secrets): minimum length, no composition rules,
// compared against a list of commonly used or compromised values.
describe('password policy (NIST SP 800-63B)', () => {
  it('asks for at least 12 characters, counting characters not bytes', () => {
    expect(PASSWORD_MIN).toBe(12);
    expect(passwordProblem('abcdefghijk')).toMatch(/at least 12/);
    expect(passwordProblem('ünïcödé-wörd')).toBeNull();
  });

  it('has no composition rules: lower-case words alone pass', () => {
    expect(passwordProblem('tidal harbour lantern')).toBeNull();
  });

  it('refuses passwords on the shipped common-password list, whatever their case', () => {
    expect(isCommonPassword('qwerty123456')).toBe(true);
    expect(passwordProblem('QWERTY123456')).toMatch(/commonly used/);
    expect(passwordProblem('1q2w3e4r5t6y')).toMatch(/commonly used/);
    expect(isCommonPassword('tidal harbour lantern')).toBe(false);
  });

  it('refuses more than bcrypt can read (72 bytes)', () => {
    expect(passwordProblem('a'.repeat(72))).toBeNull();
    expect(passwordProblem('a'.repeat(73))).toMatch(/72 bytes/);
  });

  it('refuses the e-mail address itself', () => {
    expect(passwordProblem('nurse.jones@harbourside.example', { email: 'nurse.jones@harbourside.example' })).toMatch(
      /e-mail/,
    );
  });

  it('estimates strength for the meter (zxcvbn scores 0–4)', () => {
    const weak = passwordStrength('password1234');
    expect(weak.score).toBeLessThanOrEqual(1);
    expect(weak.hint).toBeTruthy();
    const strong = passwordStrength('tidal harbour lantern quietly');
    expect(strong.score).toBe(4);
    expect(strong.word).toBe('strong');
  });
});
