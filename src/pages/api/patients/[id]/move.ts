import { BED_MANAGING_ROLES } from '~/lib/auth/roles.ts';
import { idParam, moveSchema } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { movePatient } from '~/lib/server/charting/patients.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, BED_MANAGING_ROLES);
  const { id } = parseParams(params, idParam);
  const { bedId } = await parseBody(request, moveSchema);
  return json({ patient: await movePatient(user, id, bedId) });
});
