import knexFactory, { type Knex } from 'knex';
import { connectionFromEnv } from './connection.ts';

// One pool per process, created on first use so a page that needs no data opens no connection.
let instance: Knex | undefined;

export function db(): Knex {
  instance ??= knexFactory(connectionFromEnv(process.env));
  return instance;
}

export async function closeDb(): Promise<void> {
  await instance?.destroy();
  instance = undefined;
}
