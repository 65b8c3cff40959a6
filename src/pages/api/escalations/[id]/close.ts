import { CLOSING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { closeSchema } from '~/lib/escalations/inputs.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { closeEscalation } from '~/lib/server/escalations/service.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CLOSING_ROLES);
  const { id } = parseParams(params, idParam);
  const { outcome, note } = await parseBody(request, closeSchema);
  return json(await closeEscalation(user, id, outcome, note));
});
