import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // Shift start and end as wall-clock times in the unit's zone ("07:30", "19:30"): settings, not advice.
  await knex.schema.alterTable('unit_settings', (t) => {
    t.string('shift_start', 5).notNullable().defaultTo('07:30');
    t.string('shift_end', 5).notNullable().defaultTo('19:30');
  });

  // Handover notes are versioned: a new note for a patient is a new row naming the one it replaces;
  // nothing is updated in place or deleted, so every earlier version stays readable.
  await knex.schema.createTable('handover_notes', (t) => {
    t.increments('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.integer('version').unsigned().notNullable();
    t.text('note').notNullable();
    t.integer('supersedes_id').unsigned().nullable().references('handover_notes.id');
    t.integer('written_by').unsigned().notNullable().references('users.id');
    t.datetime('written_at', { precision: 3 }).notNullable();
    // Two writers racing on the same base version: the second insert fails on this index (409 upstream).
    t.unique(['patient_id', 'version']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('handover_notes');
  await knex.schema.alterTable('unit_settings', (t) => {
    t.dropColumn('shift_end');
    t.dropColumn('shift_start');
  });
}
