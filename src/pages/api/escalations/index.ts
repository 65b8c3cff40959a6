import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { listEscalationsQuery } from '~/lib/escalations/inputs.ts';
import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { listForUser } from '~/lib/server/escalations/service.ts';

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const q = parseQuery(url, listEscalationsQuery);
  return json({ escalations: await listForUser(user, q), generatedAt: new Date().toISOString() });
});
