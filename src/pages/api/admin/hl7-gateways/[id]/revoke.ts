import { idParam } from '~/lib/charting/patient-input.ts';
import { revokeSchema } from '~/lib/hl7/gateway-input.ts';
import { revokeGatewayById } from '~/lib/server/hl7/gateways.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, ['admin']);
  const { id } = parseParams(params, idParam);
  const { reason } = await parseBody(request, revokeSchema);
  return json({ gateway: await revokeGatewayById(user.id, id, reason) });
});
