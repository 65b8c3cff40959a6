import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('device_keys', (t) => {
    t.increments('id').primary();
    // A key speaks for one bed: its readings go to whoever is in that bed at the reading's time.
    t.integer('bed_id').unsigned().notNullable().references('beds.id');
    t.string('label', 80).notNullable();
    // Only a SHA-256 of the key is kept (keys are 256 random bits, so a slow hash adds nothing);
    // the prefix lets an admin tell keys apart without being able to use them.
    t.string('key_hash', 64).notNullable().unique();
    t.string('key_prefix', 16).notNullable();
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('last_used_at', { precision: 3 }).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.integer('revoked_by').unsigned().nullable().references('users.id');
    t.string('revoke_reason', 200).nullable();
    t.index(['bed_id']);
  });

  // Device readings: one per bed per instant. The generated column is the bed only for device
  // rows, so the unique index lets INSERT IGNORE drop a resent batch's duplicates in the database.
  await knex.raw(
    "ALTER TABLE observations ADD COLUMN device_bed_id INT UNSIGNED AS (IF(source = 'device', bed_id, NULL)) PERSISTENT",
  );
  await knex.schema.alterTable('observations', (t) => {
    t.unique(['device_bed_id', 'taken_at'], { indexName: 'observations_device_bed_taken_unique' });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('observations', (t) => {
    t.dropUnique(['device_bed_id', 'taken_at'], 'observations_device_bed_taken_unique');
  });
  await knex.raw('ALTER TABLE observations DROP COLUMN device_bed_id');
  await knex.schema.dropTable('device_keys');
}
