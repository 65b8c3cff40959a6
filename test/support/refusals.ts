/** Bad input, case by case: each one refused with its field named, and nothing stored. */
import { expect } from 'vitest';
import type { Knex } from 'knex';
import { countRows } from './db.ts';

/** A change to a good body, the field the refusal must name and, when given, words its reason must match. */
export type RefusalCase = [patch: Record<string, unknown>, field: string, reason?: RegExp];

/** Sends each case; every one must come back 400 naming its field, and `table` must keep its row count. */
export async function expectEachRefused(
  db: Knex,
  table: string,
  cases: RefusalCase[],
  send: (patch: Record<string, unknown>) => Promise<Response>,
) {
  const before = await countRows(db, table);
  for (const [patch, field, reason] of cases) {
    const res = await send(patch);
    expect(res.status, JSON.stringify(patch)).toBe(400);
    const { error } = await res.json();
    if (reason) expect(error.fields[field], JSON.stringify({ patch, error })).toMatch(reason);
    else expect(error.fields, JSON.stringify(patch)).toHaveProperty(field);
  }
  expect(await countRows(db, table)).toBe(before);
}
