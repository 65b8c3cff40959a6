import { afterAll, describe, expect, it } from 'vitest';
import { testDb } from '../support/db.ts';

// Galera replicates row events keyed by the primary key: a table without one is refused or
// replicated badly, so every table — knex's own included — must carry one (STACK.md, round two).
const db = testDb();
afterAll(async () => {
  await db.destroy();
});

describe('the schema is Galera-safe', () => {
  it('every table has a primary key', async () => {
    const [rows] = await db.raw(`
      SELECT t.TABLE_NAME AS name
        FROM information_schema.TABLES t
        LEFT JOIN information_schema.TABLE_CONSTRAINTS c
          ON c.TABLE_SCHEMA = t.TABLE_SCHEMA AND c.TABLE_NAME = t.TABLE_NAME AND c.CONSTRAINT_TYPE = 'PRIMARY KEY'
       WHERE t.TABLE_SCHEMA = DATABASE() AND t.TABLE_TYPE = 'BASE TABLE' AND c.CONSTRAINT_NAME IS NULL`);
    const [all] = await db.raw(
      `SELECT COUNT(*) AS n FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() AND TABLE_TYPE = 'BASE TABLE'`,
    );
    expect(Number(all[0].n)).toBeGreaterThan(10); // the migrated schema, not an empty database
    expect(rows.map((r: { name: string }) => r.name)).toEqual([]);
  });

  it('every table is InnoDB (Galera replicates InnoDB only)', async () => {
    const [rows] = await db.raw(
      `SELECT TABLE_NAME AS name, ENGINE AS engine FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() AND TABLE_TYPE = 'BASE TABLE' AND ENGINE <> 'InnoDB'`,
    );
    expect(rows).toEqual([]);
  });
});
