import type { Knex } from 'knex';
import { rebuildAllRollups } from '../../src/lib/server/queries/rollup.ts';

export async function up(knex: Knex): Promise<void> {
  // Per-minute rollup of each patient's current readings, so long chart windows read one row a
  // minute, not one a second. Derived from `observations` (the record stays there); every writer
  // recomputes the minutes it touched in its own transaction (src/lib/server/queries/rollup.ts).
  await knex.schema.createTable('observation_minutes', (t) => {
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.datetime('minute').notNullable();
    t.integer('trusted_n').unsigned().notNullable();
    t.integer('untrusted_n').unsigned().notNullable();
    t.integer('charted_n').unsigned().notNullable();
    t.integer('spo2_n').unsigned().notNullable();
    t.tinyint('spo2_min').unsigned().nullable();
    t.tinyint('spo2_max').unsigned().nullable();
    t.integer('spo2_sum').unsigned().notNullable();
    t.integer('u_spo2_n').unsigned().notNullable();
    t.tinyint('u_spo2_min').unsigned().nullable();
    t.tinyint('u_spo2_max').unsigned().nullable();
    t.integer('u_spo2_sum').unsigned().notNullable();
    t.integer('hr_n').unsigned().notNullable();
    t.smallint('hr_min').unsigned().nullable();
    t.smallint('hr_max').unsigned().nullable();
    t.integer('hr_sum').unsigned().notNullable();
    // Milliseconds of the minute carried by untrusted readings, and by trusted ones per SpO₂ value ("94:30000,95:30000").
    t.integer('untrusted_ms').unsigned().notNullable();
    t.string('trusted_ms', 1000).notNullable();
    t.primary(['patient_id', 'minute']);
  });
  await rebuildAllRollups(knex);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('observation_minutes');
}
