import type { Knex } from 'knex';

/** The values of the escalations.kind ENUM as the database has them now (other migrations may add kinds too). */
async function kindValues(knex: Knex): Promise<string[]> {
  const [rows] = await knex.raw(
    "SELECT COLUMN_TYPE AS t FROM information_schema.COLUMNS WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'escalations' AND COLUMN_NAME = 'kind'",
  );
  return [...String(rows[0].t).matchAll(/'((?:[^']|'')*)'/g)].map((m) => m[1]!.replace(/''/g, "'"));
}
async function setKinds(knex: Knex, values: string[]): Promise<void> {
  await knex.raw(`ALTER TABLE escalations MODIFY kind ENUM(${values.map(() => '?').join(', ')}) NOT NULL`, values);
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('blood_gases', (t) => {
    t.bigIncrements('id').primary();
    t.integer('patient_id').unsigned().notNullable().references('patients.id');
    t.integer('bed_id').unsigned().nullable().references('beds.id');
    t.datetime('sampled_at', { precision: 3 }).notNullable();
    t.enu('sample_type', ['arterial', 'venous', 'capillary']).notNullable();
    t.decimal('ph', 4, 3).notNullable();
    // Stored in one unit (mmHg) whatever was typed; the unit typed is kept beside them.
    t.decimal('pao2_mmhg', 5, 1).notNullable();
    t.decimal('paco2_mmhg', 5, 1).notNullable();
    t.enu('entered_unit', ['kPa', 'mmHg']).notNullable();
    t.decimal('sao2', 4, 1).notNullable();
    t.decimal('hco3', 4, 1).nullable();
    t.decimal('base_excess', 4, 1).nullable();
    t.decimal('lactate', 4, 1).nullable();
    t.decimal('hb_gdl', 4, 1).nullable();
    t.decimal('fio2', 4, 3).notNullable();
    t.tinyint('spo2_at_sample').unsigned().nullable();
    t.enu('spo2_source', ['entered', 'nearest_reading']).nullable();
    t.string('note', 1000).nullable();
    // Never deleted: as for obs, a correction is a new row naming the original, which is marked superseded.
    t.enu('status', ['current', 'superseded', 'entered_in_error']).notNullable().defaultTo('current');
    t.bigInteger('replaces_id').unsigned().nullable().references('blood_gases.id');
    t.string('status_reason', 500).nullable();
    t.integer('status_by').unsigned().nullable().references('users.id');
    t.datetime('status_at', { precision: 3 }).nullable();
    t.integer('recorded_by').unsigned().nullable().references('users.id');
    t.datetime('recorded_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['patient_id', 'status', 'sampled_at']);
  });
  await knex.schema.alterTable('unit_settings', (t) => {
    t.enu('gas_unit', ['kPa', 'mmHg']).notNullable().defaultTo('kPa');
    t.smallint('barometric_mmhg').unsigned().notNullable().defaultTo(760);
  });
  // What the latest blood gas said when Scale 2 was ordered (or that none supported it).
  await knex.schema.alterTable('target_orders', (t) => {
    t.string('scale2_basis', 300).nullable();
  });
  const kinds = await kindValues(knex);
  if (!kinds.includes('occult_hypoxaemia')) await setKinds(knex, [...kinds, 'occult_hypoxaemia']);
}

export async function down(knex: Knex): Promise<void> {
  await setKinds(
    knex,
    (await kindValues(knex)).filter((k) => k !== 'occult_hypoxaemia'),
  );
  await knex.schema.alterTable('target_orders', (t) => {
    t.dropColumn('scale2_basis');
  });
  await knex.schema.alterTable('unit_settings', (t) => {
    t.dropColumn('barometric_mmhg');
    t.dropColumn('gas_unit');
  });
  await knex.schema.dropTable('blood_gases');
}
