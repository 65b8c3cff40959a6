/**
 * Password rules after NIST SP 800-63B (section 5.1.1.2): at least 12 characters, no composition
 * rules, refused when the password is on a list of commonly used passwords. The list is the one
 * @zxcvbn-ts/language-common ships (about 49,000 passwords seen in breaches); the strength shown
 * while typing is zxcvbn's estimate. Pure: the browser form and the server use this same module.
 */
import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import * as common from '@zxcvbn-ts/language-common';
import { z } from 'zod';

export const PASSWORD_MIN = 12;
// bcrypt reads at most 72 bytes; NIST asks that at least 64 characters be allowed.
export const PASSWORD_MAX_BYTES = 72;

let commonSet: Set<string> | undefined;
let factory: ZxcvbnFactory | undefined;

function commonPasswords(): Set<string> {
  commonSet ??= new Set(common.dictionary['passwords-common'].map((p) => p.toLowerCase()));
  return commonSet;
}

export function isCommonPassword(password: string): boolean {
  return commonPasswords().has(password.toLowerCase());
}

/** The first reason a password is refused, or null when it is acceptable. */
export function passwordProblem(password: string, context: { email?: string; name?: string } = {}): string | null {
  if ([...password].length < PASSWORD_MIN) return `Use at least ${PASSWORD_MIN} characters.`;
  if (new TextEncoder().encode(password).length > PASSWORD_MAX_BYTES)
    return `Use at most ${PASSWORD_MAX_BYTES} bytes (about 64 characters).`;
  if (isCommonPassword(password)) return 'This password is on a list of commonly used passwords; choose another.';
  const email = context.email?.toLowerCase();
  if (email && (password.toLowerCase() === email || password.toLowerCase() === email.split('@')[0]))
    return 'Do not use your e-mail address as your password.';
  return null;
}

export const STRENGTH_WORDS = ['very weak', 'weak', 'fair', 'good', 'strong'] as const;

export interface Strength {
  score: 0 | 1 | 2 | 3 | 4;
  word: (typeof STRENGTH_WORDS)[number];
  hint: string | null;
}

/** zxcvbn's estimate (0–4) with a word and its first suggestion; shown while typing, never a rule. */
export function passwordStrength(password: string, userInputs: string[] = []): Strength {
  factory ??= new ZxcvbnFactory({ dictionary: { ...common.dictionary }, graphs: common.adjacencyGraphs });
  const result = factory.check(password.slice(0, 100), userInputs);
  const score = result.score as Strength['score'];
  return {
    score,
    word: STRENGTH_WORDS[score],
    hint: result.feedback.warning ? warningText(result.feedback.warning) : null,
  };
}

// zxcvbn-ts returns warning keys when no translations are loaded; say them in plain words.
function warningText(key: string): string {
  const words: Record<string, string> = {
    straightRow: 'Straight rows of keys are easy to guess.',
    keyPattern: 'Short keyboard patterns are easy to guess.',
    simpleRepeat: 'Repeated characters like "aaa" are easy to guess.',
    extendedRepeat: 'Repeated patterns are easy to guess.',
    sequences: 'Sequences like "abc" or "6543" are easy to guess.',
    recentYears: 'Recent years are easy to guess.',
    dates: 'Dates are easy to guess.',
    topTen: 'This is a very commonly used password.',
    topHundred: 'This is a commonly used password.',
    common: 'This is a commonly used password.',
    similarToCommon: 'This is similar to a commonly used password.',
    wordByItself: 'Single words are easy to guess.',
    namesByThemselves: 'Single names or surnames are easy to guess.',
    commonNames: 'Common names and surnames are easy to guess.',
    userInputs: 'Avoid your own name or e-mail.',
    pwned: 'This password appeared in a data breach.',
  };
  return words[key] ?? 'Add another word or two.';
}

/** The one schema for a new password, in the form and on the server. */
export const newPasswordSchema = z.string().superRefine((value, ctx) => {
  const problem = passwordProblem(value);
  if (problem) ctx.addIssue({ code: z.ZodIssueCode.custom, message: problem });
});
