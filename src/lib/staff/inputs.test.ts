import { describe, expect, it } from 'vitest';
import { createUnitSchema, createUserSchema, reorderBedsSchema, unitRuleProblem } from './inputs.ts';

describe('staff inputs', () => {
  it('ties nurses and charge nurses to a unit and keeps other roles free of one', () => {
    expect(unitRuleProblem('nurse', null)).toMatch(/needs a unit/);
    expect(unitRuleProblem('charge', 'ICU4')).toBeNull();
    expect(unitRuleProblem('intensivist', 'ICU4')).toMatch(/across units/);
    expect(unitRuleProblem('admin', undefined)).toBeNull();
  });

  it('names the unit field when the role rule is broken', () => {
    const r = createUserSchema.safeParse({ name: 'Ana Lim', email: 'ana@x.example', role: 'nurse' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(['unitCode']);
  });

  it('lower-cases e-mail and upper-cases unit codes', () => {
    const r = createUserSchema.parse({ name: 'Ana Lim', email: ' Ana@X.Example ', role: 'nurse', unitCode: 'icu4' });
    expect(r).toEqual({ name: 'Ana Lim', email: 'ana@x.example', role: 'nurse', unitCode: 'ICU4' });
  });

  it('accepts IANA zones only', () => {
    const base = { code: 'W7', name: 'Ward 7', hospital: 'H' + 'arbour' };
    expect(createUnitSchema.safeParse({ ...base, timeZone: 'Europe/London' }).success).toBe(true);
    expect(createUnitSchema.safeParse({ ...base, timeZone: 'Mars/Olympus' }).success).toBe(false);
  });

  it('refuses a bed listed twice in a new order', () => {
    expect(reorderBedsSchema.safeParse({ bedIds: [1, 2, 1] }).success).toBe(false);
  });
});
