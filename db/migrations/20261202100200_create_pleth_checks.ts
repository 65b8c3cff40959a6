import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // A raw pleth strip checked against a patient's reading: the strip itself is kept so the
  // verdict can be reproduced, and the figures as the computation module found them then.
  await knex.schema.createTable('pleth_checks', (t) => {
    t.bigIncrements('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.bigInteger('observation_id').unsigned().nullable().references('observations.id');
    t.string('file_name', 255).notNullable();
    t.string('file_hash', 64).notNullable();
    t.specificType('strip_csv', 'MEDIUMTEXT').notNullable();
    t.decimal('sample_rate_hz', 8, 3).notNullable();
    t.enu('verdict', ['trustworthy', 'doubtful', 'unusable']).notNullable();
    t.decimal('spo2', 5, 1).nullable();
    t.decimal('heart_rate', 5, 1).nullable();
    t.decimal('perfusion_index', 6, 3).nullable();
    t.decimal('r_median', 6, 4).nullable();
    t.json('reasons').notNullable();
    t.string('curve', 40).notNullable();
    t.string('note', 500).nullable();
    t.integer('checked_by').unsigned().notNullable().references('users.id');
    t.datetime('checked_at', { precision: 3 }).notNullable();
    t.index(['patient_id', 'checked_at']);
    t.index(['observation_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('pleth_checks');
}
