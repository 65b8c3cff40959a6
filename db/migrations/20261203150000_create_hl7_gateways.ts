import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // Monitor gateways that send HL7 v2 over MLLP. A gateway is known by the sender it names in
  // MSH-3 (sending application) and MSH-4 (sending facility); messages from any other sender are
  // refused. Like device keys: made and revoked by an admin, audited, never deleted.
  await knex.schema.createTable('hl7_gateways', (t) => {
    t.increments('id').primary();
    t.string('label', 80).notNullable();
    t.string('sending_application', 64).notNullable();
    t.string('sending_facility', 64).notNullable();
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('last_message_at', { precision: 3 }).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.integer('revoked_by').unsigned().nullable().references('users.id');
    t.string('revoke_reason', 200).nullable();
  });
  // One live gateway per sender: the generated column is the sender only while the gateway is live.
  await knex.raw(
    "ALTER TABLE hl7_gateways ADD COLUMN live_sender VARCHAR(130) AS (IF(revoked_at IS NULL, CONCAT(sending_application, '|', sending_facility), NULL)) PERSISTENT",
  );
  await knex.schema.alterTable('hl7_gateways', (t) => {
    t.unique(['live_sender'], { indexName: 'hl7_gateways_live_sender_unique' });
  });

  // The gateway's names for beds (PV1-3 as sent: point of care^room^bed) mapped to our beds.
  // Removing a mapping is a configuration change, audited; readings already stored keep their bed.
  await knex.schema.createTable('hl7_gateway_beds', (t) => {
    t.increments('id').primary();
    t.integer('gateway_id').unsigned().notNullable().references('hl7_gateways.id');
    t.string('bed_name', 120).notNullable();
    t.integer('bed_id').unsigned().notNullable().references('beds.id');
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(['gateway_id', 'bed_name'], { indexName: 'hl7_gateway_beds_name_unique' });
    t.index(['bed_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('hl7_gateway_beds');
  await knex.schema.alterTable('hl7_gateways', (t) => {
    t.dropUnique(['live_sender'], 'hl7_gateways_live_sender_unique');
  });
  await knex.raw('ALTER TABLE hl7_gateways DROP COLUMN live_sender');
  await knex.schema.dropTable('hl7_gateways');
}
