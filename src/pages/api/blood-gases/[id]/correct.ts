import { GAS_CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { bloodGasCorrectionSchema } from '~/lib/bloodgas/bloodgas-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { correctBloodGas } from '~/lib/server/bloodgas/blood-gases.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, GAS_CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const now = new Date();
  const { reason, gas } = await parseBody(request, bloodGasCorrectionSchema(now));
  return json(await correctBloodGas(user, id, reason, gas, now), 201);
});
