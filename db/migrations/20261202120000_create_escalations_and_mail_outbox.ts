import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('escalations', (t) => {
    t.increments('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('unit_id').unsigned().notNullable().references('units.id');
    t.integer('bed_id').unsigned().nullable().references('beds.id');
    t.enu('kind', ['below_band', 'probe_check', 'wean_prompt']).notNullable();
    t.enu('severity', ['standard', 'urgent']).nullable();
    t.enu('state', ['raised', 'claimed', 'closed']).notNullable().defaultTo('raised');
    t.datetime('raised_at', { precision: 3 }).notNullable();
    // The run that proves it (first and last reading), so a closed escalation is not raised again for the same run.
    t.datetime('run_start', { precision: 3 }).notNullable();
    t.datetime('run_end', { precision: 3 }).notNullable();
    t.json('evidence').notNullable();
    t.integer('claimed_by').unsigned().nullable().references('users.id');
    t.datetime('claimed_at', { precision: 3 }).nullable();
    t.integer('closed_by').unsigned().nullable().references('users.id');
    t.datetime('closed_at', { precision: 3 }).nullable();
    t.enu('outcome', [
      'treated_at_bedside',
      'reviewed_by_outreach',
      'escalated_to_intensivist',
      'reading_was_artefact',
      'condition_cleared',
      'other',
    ]).nullable();
    t.string('close_note', 1000).nullable();
    t.datetime('last_notified_at', { precision: 3 }).nullable();
    t.integer('notify_count').notNullable().defaultTo(0);
    t.datetime('back_in_band_at', { precision: 3 }).nullable();
    // One open escalation of a kind per patient, held by the database itself against racing instances.
    t.specificType(
      'open_key',
      "VARCHAR(40) AS (IF(state <> 'closed', CONCAT(patient_id, ':', kind), NULL)) PERSISTENT",
    );
    t.unique(['open_key']);
    t.index(['state', 'raised_at']);
    t.index(['patient_id', 'kind', 'run_start']);
  });

  await knex.schema.createTable('escalation_events', (t) => {
    t.bigIncrements('id').primary();
    t.integer('escalation_id').unsigned().notNullable().references('escalations.id');
    t.enu('type', [
      'raised',
      'severity_raised',
      'notified',
      'renotified',
      'claimed',
      'closed',
      'back_in_band',
    ]).notNullable();
    t.integer('actor_id').unsigned().nullable().references('users.id');
    t.datetime('at', { precision: 3 }).notNullable();
    t.json('detail').nullable();
    t.index(['escalation_id', 'at']);
  });

  // Written in the same transaction as what it announces; a worker delivers it (at-least-once to
  // SMTP, once per row thanks to row claims, and deduplicable downstream by Message-ID).
  await knex.schema.createTable('mail_outbox', (t) => {
    t.bigIncrements('id').primary();
    t.string('idempotency_key', 120).notNullable().unique();
    t.integer('escalation_id').unsigned().nullable().references('escalations.id');
    t.text('to_addresses').notNullable();
    t.string('subject', 300).notNullable();
    t.text('text_body').notNullable();
    t.text('html_body').notNullable();
    t.enu('status', ['pending', 'sending', 'sent', 'failed']).notNullable().defaultTo('pending');
    t.integer('attempts').notNullable().defaultTo(0);
    t.datetime('next_attempt_at', { precision: 3 }).notNullable();
    t.datetime('claimed_until', { precision: 3 }).nullable();
    t.string('claimed_by', 80).nullable();
    t.string('last_error', 1000).nullable();
    t.string('message_id', 200).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable();
    t.datetime('sent_at', { precision: 3 }).nullable();
    t.index(['status', 'next_attempt_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_outbox');
  await knex.schema.dropTable('escalation_events');
  await knex.schema.dropTable('escalations');
}
