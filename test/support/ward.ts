/**
 * The usual setting of an integration file, in one place: a fixture unit with its beds, optionally a
 * second unit, and fixture staff signed in through the real sign-in flow; the test database is closed
 * once the file is done.
 */
import { afterAll, beforeAll } from 'vitest';
import type { Knex } from 'knex';
import type { HttpSession } from './app.ts';
import { createUnit, testDb } from './db.ts';
import { signInPeople } from './people.ts';

export type FixtureUnit = Awaited<ReturnType<typeof createUnit>>;
/** Where a person works: the ward's unit, the other unit, or no unit (roles that span units). */
export type WardHome = 'unit' | 'other' | null;

export interface WardSpec {
  beds: number;
  /** A second unit with this many beds (for "not your unit" cases). */
  otherBeds?: number;
  /** One fresh user per entry, signed in as `s[key]`, id in `ids[key]`; `s.anon` is signed out. */
  people: Record<string, [role: string, home: WardHome]>;
}

export interface Ward {
  db: Knex;
  unit: FixtureUnit;
  other: FixtureUnit;
  s: Record<string, HttpSession>;
  ids: Record<string, number>;
}

/**
 * Call at the top of a test file. The objects returned are filled in by the file's first `beforeAll`,
 * so a file may destructure them at once and use them in its tests and later hooks.
 */
export function useWard(spec: WardSpec): Ward {
  const ward: Ward = { db: testDb(), unit: {} as FixtureUnit, other: {} as FixtureUnit, s: {}, ids: {} };
  beforeAll(async () => {
    Object.assign(ward.unit, await createUnit(ward.db, spec.beds));
    if (spec.otherBeds !== undefined) Object.assign(ward.other, await createUnit(ward.db, spec.otherBeds));
    const unitIdOf = (home: WardHome) => {
      if (home === null) return null;
      if (home === 'other' && spec.otherBeds === undefined)
        throw new Error('useWard: a person in the other unit needs otherBeds');
      return ward[home].unitId;
    };
    const people = await signInPeople(
      ward.db,
      Object.fromEntries(Object.entries(spec.people).map(([key, [role, home]]) => [key, [role, unitIdOf(home)]])),
    );
    Object.assign(ward.s, people.sessions);
    Object.assign(ward.ids, people.ids);
  });
  afterAll(async () => {
    await ward.db.destroy();
  });
  return ward;
}
