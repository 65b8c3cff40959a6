import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { listImports } from '~/lib/server/trend-files/imports.ts';

export const GET = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  return json(await listImports(user, id));
});
