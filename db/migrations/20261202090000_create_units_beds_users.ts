import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('units', (t) => {
    t.increments('id').primary();
    t.string('code', 16).notNullable().unique();
    t.string('name', 80).notNullable();
    t.string('hospital', 80).notNullable();
    // IANA zone: times are stored in UTC and shown in the unit's local time.
    t.string('time_zone', 64).notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });

  await knex.schema.createTable('beds', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.string('label', 16).notNullable();
    t.integer('position').notNullable().defaultTo(0);
    t.boolean('active').notNullable().defaultTo(true);
    t.unique(['unit_id', 'label']);
  });

  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.string('email', 190).notNullable().unique();
    t.string('name', 120).notNullable();
    t.enu('role', ['nurse', 'charge', 'intensivist', 'outreach', 'admin']).notNullable();
    // Nurses and charge nurses belong to one unit; the other roles span units.
    t.integer('unit_id').unsigned().nullable().references('units.id');
    t.string('password_hash', 100).notNullable();
    t.boolean('active').notNullable().defaultTo(true);
    // Lockout lives in the database so it holds across app instances.
    t.integer('failed_signins').notNullable().defaultTo(0);
    t.datetime('locked_until', { precision: 3 }).nullable();
    t.datetime('last_signin_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users');
  await knex.schema.dropTable('beds');
  await knex.schema.dropTable('units');
}
