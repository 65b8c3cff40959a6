import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { searchQuerySchema } from '~/lib/patients/search.ts';
import { findPatients } from '~/lib/server/charting/search.ts';

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const q = parseQuery(url, searchQuerySchema);
  return json({ results: await findPatients(user, q.q, q.discharged === 'include', q.limit) });
});
