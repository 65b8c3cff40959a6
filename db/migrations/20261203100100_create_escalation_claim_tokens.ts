import type { Knex } from 'knex';

/**
 * One-click claim links in escalation e-mail. Only a SHA-256 of each token is kept (a leaked table
 * claims nothing); a token works once (`used_at`) and until `expires_at`.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('escalation_claim_tokens', (t) => {
    t.increments('id').primary();
    t.integer('escalation_id').unsigned().notNullable().references('escalations.id');
    t.specificType('token_hash', 'CHAR(64) NOT NULL');
    t.datetime('created_at', { precision: 3 }).notNullable();
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('used_at', { precision: 3 }).nullable();
    t.integer('used_by').unsigned().nullable().references('users.id');
    t.unique(['token_hash']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('escalation_claim_tokens');
}
