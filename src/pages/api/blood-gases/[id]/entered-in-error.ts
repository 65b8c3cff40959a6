import { GAS_CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { enteredInErrorSchema } from '~/lib/bloodgas/bloodgas-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { markGasEnteredInError } from '~/lib/server/bloodgas/blood-gases.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, GAS_CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const { reason } = await parseBody(request, enteredInErrorSchema);
  return json({ bloodGas: await markGasEnteredInError(user, id, reason) });
});
