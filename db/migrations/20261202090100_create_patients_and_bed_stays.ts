import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('patients', (t) => {
    t.increments('id').primary();
    t.string('mrn', 20).notNullable().unique();
    t.string('given_name', 80).notNullable();
    t.string('family_name', 80).notNullable();
    t.date('date_of_birth').notNullable();
    // At risk of CO2 retention: guides the intensivist towards an 88–92 % band and NEWS2 Scale 2.
    t.boolean('co2_retention_risk').notNullable().defaultTo(false);
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });

  await knex.schema.createTable('bed_stays', (t) => {
    t.increments('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('bed_id').unsigned().notNullable().references('beds.id');
    t.datetime('started_at', { precision: 3 }).notNullable();
    t.datetime('ended_at', { precision: 3 }).nullable();
    t.enu('end_reason', ['moved', 'discharged']).nullable();
    t.integer('started_by').unsigned().nullable().references('users.id');
    t.integer('ended_by').unsigned().nullable().references('users.id');
    // Generated columns that are NULL once a stay ends: their unique indexes let the database
    // itself refuse two open stays in one bed, or one patient open in two beds, under races.
    t.specificType('open_bed_id', 'INT UNSIGNED AS (IF(ended_at IS NULL, bed_id, NULL)) PERSISTENT');
    t.specificType('open_patient_id', 'INT UNSIGNED AS (IF(ended_at IS NULL, patient_id, NULL)) PERSISTENT');
    t.unique(['open_bed_id']);
    t.unique(['open_patient_id']);
    t.index(['bed_id', 'started_at']);
    t.index(['patient_id', 'started_at']);
  });

  await knex.schema.createTable('target_orders', (t) => {
    t.increments('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.tinyint('low').unsigned().notNullable();
    t.tinyint('high').unsigned().notNullable();
    t.tinyint('news2_scale').unsigned().notNullable().defaultTo(1);
    t.string('preset', 32).nullable();
    t.string('reason', 500).notNullable();
    t.string('scale_reason', 500).nullable();
    t.integer('supersedes_id').unsigned().nullable().references('target_orders.id');
    t.integer('ordered_by').unsigned().notNullable().references('users.id');
    t.datetime('ordered_at', { precision: 3 }).notNullable();
    // At most one order may supersede a given order: the database settles concurrent writers.
    t.unique(['supersedes_id']);
    t.index(['patient_id', 'ordered_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('target_orders');
  await knex.schema.dropTable('bed_stays');
  await knex.schema.dropTable('patients');
}
