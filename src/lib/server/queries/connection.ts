import type { Knex } from 'knex';

// One configuration for the app, the CLI and the tests; everything comes from the environment
// (.env for `npm start`, docker-free-scripts/test.sh for `npm test`).
export function connectionFromEnv(env: NodeJS.ProcessEnv = process.env): Knex.Config {
  return {
    client: 'mysql2',
    connection: {
      host: env.DB_HOST ?? '127.0.0.1',
      port: Number(env.DB_PORT ?? 3407),
      user: env.DB_USER ?? 'ebbwatch',
      password: env.DB_PASSWORD ?? '',
      database: env.DB_NAME ?? 'ebbwatch',
      // Times are stored in UTC and converted for display in the unit's time zone.
      timezone: 'Z',
      dateStrings: false,
      supportBigNumbers: true,
      bigNumberStrings: false,
      charset: 'utf8mb4',
    },
    pool: { min: 0, max: Number(env.DB_POOL_MAX ?? 10) },
    // With MariaDB down, a request waits this long for a connection and then answers 503
    // (Knex's default is a minute, longer than any board poll or person would wait).
    acquireConnectionTimeout: Number(env.DB_ACQUIRE_TIMEOUT_MS ?? 5_000),
    migrations: { directory: './db/migrations', extension: 'ts', loadExtensions: ['.ts'] },
    seeds: { directory: './db/seeds', extension: 'ts', loadExtensions: ['.ts'] },
  };
}
