import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // The record behind each session cookie: the cookie names a session id, and a session that is
  // revoked here (sign-out, deactivation, password change) is refused at once on every instance.
  await knex.schema.createTable('sessions', (t) => {
    t.string('id', 64).primary(); // SHA-256 (hex) of the random session id carried in the cookie
    t.integer('user_id').unsigned().notNullable().references('users.id');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.string('address', 64).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.string('revoked_reason', 32).nullable();
    t.index(['user_id', 'revoked_at']);
  });
  // rate-limiter-flexible's RateLimiterMySQL table, in its own layout (key, points, expire in ms),
  // so sign-in counters are shared by every app instance.
  await knex.raw(
    'CREATE TABLE `rate_limits` (`key` VARCHAR(255) CHARACTER SET utf8 NOT NULL, `points` INT(9) NOT NULL DEFAULT 0, `expire` BIGINT UNSIGNED, PRIMARY KEY (`key`)) ENGINE = INNODB',
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('rate_limits');
  await knex.schema.dropTable('sessions');
}
