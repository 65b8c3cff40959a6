import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { handoverQuery } from '~/lib/reports/query-input.ts';
import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { handoverSheet } from '~/lib/server/reports/handover.ts';

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  return json(await handoverSheet(user, parseQuery(url, handoverQuery)));
});
