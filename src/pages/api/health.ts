import type { APIRoute } from 'astro';
import { json, errorJson } from '~/lib/server/http.ts';
import { databaseAnswers } from '~/lib/server/queries/health.ts';

/** For load balancers and the start script: 200 when the database answers, 503 when not. */
export const GET: APIRoute = async () => {
  if (await databaseAnswers()) return json({ db: 'ok' });
  return errorJson(
    503,
    'database_unavailable',
    'The database is not answering; readings cannot be charted or shown until it is back.',
  );
};
