import { CLINICAL_ROLES, GAS_CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { bloodGasInputSchema } from '~/lib/bloodgas/bloodgas-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { chartBloodGas, listBloodGases } from '~/lib/server/bloodgas/blood-gases.ts';

export const GET = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  return json(await listBloodGases(user, id));
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, GAS_CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const now = new Date();
  const input = await parseBody(request, bloodGasInputSchema(now));
  return json(await chartBloodGas(user, id, input, now), 201);
});
