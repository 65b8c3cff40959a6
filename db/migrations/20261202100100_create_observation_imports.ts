import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('observation_imports', (t) => {
    t.bigIncrements('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.string('file_name', 255).notNullable();
    t.string('file_hash', 64).notNullable();
    t.integer('file_bytes').unsigned().notNullable();
    t.integer('rows_in_file').unsigned().notNullable();
    t.integer('rows_stored').unsigned().notNullable();
    t.integer('rows_skipped').unsigned().notNullable();
    t.integer('rows_refused').unsigned().notNullable();
    t.datetime('first_at', { precision: 3 }).nullable();
    t.datetime('last_at', { precision: 3 }).nullable();
    t.json('mapping').notNullable();
    t.integer('committed_by').unsigned().notNullable().references('users.id');
    t.datetime('committed_at', { precision: 3 }).notNullable();
    t.datetime('withdrawn_at', { precision: 3 }).nullable();
    t.integer('withdrawn_by').unsigned().nullable().references('users.id');
    t.string('withdraw_reason', 500).nullable();
    // The same file may be committed once while it stands; after a withdrawal it may come in
    // again (e.g. to the right patient). NULL once withdrawn, so the unique index settles races.
    t.specificType('active_file_hash', 'CHAR(64) AS (IF(withdrawn_at IS NULL, file_hash, NULL)) PERSISTENT');
    t.unique(['active_file_hash']);
    t.index(['patient_id', 'committed_at']);
  });

  // The column mapping a unit's monitors export, remembered for the next upload.
  await knex.schema.createTable('import_mappings', (t) => {
    t.integer('unit_id').unsigned().primary().references('units.id');
    t.json('mapping').notNullable();
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });

  await knex.raw(
    "ALTER TABLE observations MODIFY status ENUM('current', 'superseded', 'entered_in_error', 'withdrawn') NOT NULL DEFAULT 'current'",
  );
  await knex.schema.alterTable('observations', (t) => {
    t.bigInteger('import_id').unsigned().nullable().references('observation_imports.id');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('observations', (t) => {
    t.dropForeign(['import_id']);
    t.dropColumn('import_id');
  });
  await knex.raw(
    "ALTER TABLE observations MODIFY status ENUM('current', 'superseded', 'entered_in_error') NOT NULL DEFAULT 'current'",
  );
  await knex.schema.dropTable('import_mappings');
  await knex.schema.dropTable('observation_imports');
}
