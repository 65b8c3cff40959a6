import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    // New accounts and admin resets must choose a password before doing anything else.
    t.boolean('must_change_password').notNullable().defaultTo(false);
    t.datetime('password_changed_at', { precision: 3 }).nullable();
    t.datetime('deactivated_at', { precision: 3 }).nullable();
  });

  // Set-password links: only a SHA-256 of the token is kept; single use, with an expiry.
  await knex.schema.createTable('password_links', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id');
    t.specificType('token_hash', 'CHAR(64)').notNullable().unique();
    t.enu('purpose', ['invite', 'reset']).notNullable();
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable();
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('used_at', { precision: 3 }).nullable();
    t.index(['user_id', 'created_at']);
  });

  // A retired bed keeps its stays and readings; `active` false hides it from the board and admissions.
  await knex.schema.alterTable('beds', (t) => {
    t.datetime('retired_at', { precision: 3 }).nullable();
    t.integer('retired_by').unsigned().nullable().references('users.id');
  });
  // The audit reader filters by action (actor_id already has its foreign key's index).
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['action', 'at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => {
    t.dropIndex(['action', 'at']);
  });
  await knex.schema.alterTable('beds', (t) => {
    t.dropForeign(['retired_by']);
    t.dropColumn('retired_by');
    t.dropColumn('retired_at');
  });
  await knex.schema.dropTable('password_links');
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('deactivated_at');
    t.dropColumn('password_changed_at');
    t.dropColumn('must_change_password');
  });
}
