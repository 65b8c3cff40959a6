import type { Knex } from 'knex';

/**
 * Issue 10: the unit's phone goes into escalation e-mail; a monitored bed counts as silent once its
 * newest device reading is older than `monitor_silent_min`; a monitor silent for
 * `silent_below_probe_min` right after trusted below-band readings raises a bedside probe check.
 * Defaults are settings, not clinical advice.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('unit_settings', (t) => {
    t.string('unit_phone', 40).nullable();
    t.smallint('monitor_silent_min').unsigned().notNullable().defaultTo(3);
    t.smallint('silent_below_probe_min').unsigned().notNullable().defaultTo(3);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('unit_settings', (t) => {
    t.dropColumn('silent_below_probe_min');
    t.dropColumn('monitor_silent_min');
    t.dropColumn('unit_phone');
  });
}
