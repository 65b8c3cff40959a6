import { idParam } from '~/lib/charting/patient-input.ts';
import { gatewayBedSchema } from '~/lib/hl7/gateway-input.ts';
import { mapGatewayBed } from '~/lib/server/hl7/gateways.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, ['admin']);
  const { id } = parseParams(params, idParam);
  const input = await parseBody(request, gatewayBedSchema);
  return json({ gateway: await mapGatewayBed(user.id, id, input) }, 201);
});
