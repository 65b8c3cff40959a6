// The Knex CLI's entry point; the configuration itself lives with the queries that use it.
import { connectionFromEnv } from './src/lib/server/queries/connection.ts';

export { connectionFromEnv };
export default connectionFromEnv();
