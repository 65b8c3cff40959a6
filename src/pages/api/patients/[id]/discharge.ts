import { BED_MANAGING_ROLES } from '~/lib/auth/roles.ts';
import { dischargeSchema, idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { dischargePatient } from '~/lib/server/charting/patients.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, BED_MANAGING_ROLES);
  const { id } = parseParams(params, idParam);
  const { note } = await parseBody(request, dischargeSchema);
  return json({ patient: await dischargePatient(user, id, note) });
});
