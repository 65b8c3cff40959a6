import { describe, expect, it } from 'vitest';
import type { Role } from '~/lib/auth/roles.ts';
import { assertChangeable } from './access.ts';

const person = (id: number, role: Role) => ({
  id,
  email: 'a',
  name: 'a',
  role,
  unitId: 1,
  unitCode: 'U',
  unitName: 'U',
});
const OBS = { what: 'obs', notOwn: 'A nurse corrects their own entries; ask the charge nurse to correct this one.' };
const GAS = { what: 'blood gas', notOwn: 'You correct your own entries; ask the charge nurse to correct this one.' };

describe('correcting or marking a charted row (obs and blood gases)', () => {
  it('refuses a row that is no longer current with 409 and the words of its kind', () => {
    expect(() => assertChangeable(person(1, 'nurse'), { status: 'superseded', recorded_by: 1 }, OBS)).toThrow(
      expect.objectContaining({
        status: 409,
        code: 'not_current',
        message: 'This obs was already corrected; correct the newer version.',
      }),
    );
    expect(() => assertChangeable(person(1, 'charge'), { status: 'entered_in_error', recorded_by: 1 }, GAS)).toThrow(
      expect.objectContaining({
        status: 409,
        code: 'not_current',
        message: 'This blood gas is already marked entered in error.',
      }),
    );
    // A withdrawn import reads as marked, as it always has.
    expect(() => assertChangeable(person(1, 'charge'), { status: 'withdrawn', recorded_by: 1 }, OBS)).toThrow(
      expect.objectContaining({ status: 409, message: 'This obs is already marked entered in error.' }),
    );
  });

  it("lets a nurse change only their own entry and the charge nurse anyone's", () => {
    expect(() => assertChangeable(person(2, 'nurse'), { status: 'current', recorded_by: 1 }, GAS)).toThrow(
      expect.objectContaining({ status: 403, code: 'forbidden', message: GAS.notOwn }),
    );
    expect(() => assertChangeable(person(2, 'intensivist'), { status: 'current', recorded_by: null }, OBS)).toThrow(
      expect.objectContaining({ status: 403, message: OBS.notOwn }),
    );
    expect(() => assertChangeable(person(1, 'nurse'), { status: 'current', recorded_by: 1 }, OBS)).not.toThrow();
    expect(() => assertChangeable(person(2, 'charge'), { status: 'current', recorded_by: 1 }, GAS)).not.toThrow();
  });
});
