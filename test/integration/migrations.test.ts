import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { testDb } from '../support/db.ts';

// Runs against a database of its own so rolling back never touches the shared test data.
let db: Knex;
beforeAll(() => {
  db = testDb(process.env.MIGRATIONS_DB_NAME ?? 'ebbwatch_migrations_test');
});

// Knex imports migration files with Node's own loader, which cannot read .ts inside Vitest;
// hand it the same files through Vite instead.
const modules = import.meta.glob<{ up: (k: Knex) => Promise<void>; down: (k: Knex) => Promise<void> }>(
  '../../db/migrations/*.ts',
  { eager: true },
);
const migrationSource = {
  getMigrations: async () => Object.keys(modules).sort(),
  getMigrationName: (name: string) => name.split('/').pop()!,
  getMigration: async (name: string) => modules[name],
};
const config = { migrationSource };
afterAll(async () => {
  await db.destroy();
});

async function tables(): Promise<string[]> {
  const rows = await db.raw('SHOW TABLES');
  return rows[0]
    .map((r: Record<string, string>) => Object.values(r)[0])
    .filter((t: string) => !t.startsWith('knex_'))
    .sort();
}

describe('migrations', () => {
  it('go up, all the way down, and up again', async () => {
    await db.migrate.latest(config);
    const up = await tables();
    for (const t of ['units', 'beds', 'users', 'patients', 'bed_stays', 'target_orders', 'observations', 'audit_log'])
      expect(up).toContain(t);
    await db.migrate.rollback(config, true);
    expect(await tables()).toEqual([]);
    await db.migrate.latest(config);
    expect(await tables()).toEqual(up);
  });

  it('let the database refuse two open stays in one bed', async () => {
    await db.migrate.latest(config);
    const [unitId] = await db('units').insert({ code: 'MIG', name: 'M', hospital: 'H', time_zone: 'UTC' });
    const [bedId] = await db('beds').insert({ unit_id: unitId, label: 'M1' });
    const [a] = await db('patients').insert({
      mrn: 'M-A',
      given_name: 'A',
      family_name: 'A',
      date_of_birth: '1970-01-01',
    });
    const [b] = await db('patients').insert({
      mrn: 'M-B',
      given_name: 'B',
      family_name: 'B',
      date_of_birth: '1970-01-01',
    });
    await db('bed_stays').insert({ patient_id: a, bed_id: bedId, started_at: new Date() });
    await expect(db('bed_stays').insert({ patient_id: b, bed_id: bedId, started_at: new Date() })).rejects.toThrow(
      /Duplicate/,
    );
    await db('bed_stays').where({ patient_id: a }).update({ ended_at: new Date(), end_reason: 'discharged' });
    await db('bed_stays').insert({ patient_id: b, bed_id: bedId, started_at: new Date() });
    await db.migrate.rollback(config, true);
  });
});
