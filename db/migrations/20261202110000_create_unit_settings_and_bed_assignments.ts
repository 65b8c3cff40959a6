import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // Per-unit settings for the board and the escalation checks. Defaults are settings, not clinical advice.
  await knex.schema.createTable('unit_settings', (t) => {
    t.integer('unit_id').unsigned().primary().references('units.id');
    t.tinyint('consecutive_charted').unsigned().notNullable().defaultTo(2);
    t.smallint('device_dwell_min').unsigned().notNullable().defaultTo(5);
    t.tinyint('urgent_margin_points').unsigned().notNullable().defaultTo(5);
    t.tinyint('urgent_floor_pct').unsigned().notNullable().defaultTo(85);
    t.smallint('cannot_verify_min').unsigned().notNullable().defaultTo(15);
    t.smallint('above_on_oxygen_min').unsigned().notNullable().defaultTo(30);
    t.smallint('renotify_min').unsigned().notNullable().defaultTo(15);
    t.smallint('overdue_min').unsigned().notNullable().defaultTo(75);
    t.text('outreach_emails').notNullable();
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });

  // Which nurse looks after which bed; history kept (ended_at), one open assignment per bed.
  await knex.schema.createTable('bed_assignments', (t) => {
    t.increments('id').primary();
    t.integer('bed_id').unsigned().notNullable().references('beds.id');
    t.integer('nurse_id').unsigned().notNullable().references('users.id');
    t.integer('assigned_by').unsigned().notNullable().references('users.id');
    t.datetime('assigned_at', { precision: 3 }).notNullable();
    t.datetime('ended_at', { precision: 3 }).nullable();
    t.integer('ended_by').unsigned().nullable().references('users.id');
    t.specificType('open_bed_id', 'INT UNSIGNED AS (IF(ended_at IS NULL, bed_id, NULL)) PERSISTENT');
    t.unique(['open_bed_id']);
    t.index(['nurse_id', 'ended_at']);
  });

  // The board asks for each patient's newest charted obs: this index answers it without a scan.
  await knex.schema.alterTable('observations', (t) => {
    t.index(['patient_id', 'source', 'status', 'taken_at'], 'observations_patient_source_status_taken');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('observations', (t) => {
    t.dropIndex(['patient_id', 'source', 'status', 'taken_at'], 'observations_patient_source_status_taken');
  });
  await knex.schema.dropTable('bed_assignments');
  await knex.schema.dropTable('unit_settings');
}
