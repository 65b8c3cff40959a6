import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('observations', (t) => {
    t.bigIncrements('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('bed_id').unsigned().nullable().references('beds.id');
    t.datetime('taken_at', { precision: 3 }).notNullable();
    t.enu('source', ['charted', 'device', 'import']).notNullable();
    t.tinyint('spo2').unsigned().nullable();
    t.smallint('heart_rate').unsigned().nullable();
    t.smallint('resp_rate').unsigned().nullable();
    t.decimal('fio2', 4, 3).nullable();
    t.boolean('fio2_estimated').notNullable().defaultTo(false);
    t.enu('device', [
      'room_air',
      'nasal_cannula',
      'simple_mask',
      'reservoir_mask',
      'high_flow_nasal',
      'niv',
      'ventilator',
    ]).nullable();
    t.decimal('flow_lpm', 4, 1).nullable();
    t.enu('trace', ['clean', 'weak', 'noisy', 'absent']).notNullable().defaultTo('clean');
    t.decimal('perfusion_index', 5, 2).nullable();
    t.string('probe_site', 32).nullable();
    t.smallint('systolic').unsigned().nullable();
    t.decimal('temperature', 3, 1).nullable();
    t.enu('consciousness', ['alert', 'new_confusion', 'voice', 'pain', 'unresponsive']).nullable();
    t.string('note', 1000).nullable();
    // Never deleted: a correction is a new row whose replaces_id names the original, which is
    // then marked superseded; "entered in error" only changes status, with who, when and why.
    t.enu('status', ['current', 'superseded', 'entered_in_error']).notNullable().defaultTo('current');
    t.bigInteger('replaces_id').unsigned().nullable().references('observations.id');
    t.string('status_reason', 500).nullable();
    t.integer('status_by').unsigned().nullable().references('users.id');
    t.datetime('status_at', { precision: 3 }).nullable();
    t.integer('recorded_by').unsigned().nullable().references('users.id');
    t.datetime('recorded_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['patient_id', 'taken_at']);
    t.index(['bed_id', 'taken_at']);
  });

  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id').primary();
    t.integer('actor_id').unsigned().nullable().references('users.id');
    t.string('action', 64).notNullable();
    t.string('entity', 32).notNullable();
    t.string('entity_id', 64).notNullable();
    t.json('before').nullable();
    t.json('after').nullable();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['entity', 'entity_id']);
    t.index(['at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_log');
  await knex.schema.dropTable('observations');
}
