import { CLAIMING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { claimEscalation } from '~/lib/server/escalations/service.ts';

export const POST = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, CLAIMING_ROLES);
  const { id } = parseParams(params, idParam);
  return json(await claimEscalation(user, id));
});
