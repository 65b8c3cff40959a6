import { gatewayCreateSchema } from '~/lib/hl7/gateway-input.ts';
import { createGateway, listAllGateways } from '~/lib/server/hl7/gateways.ts';
import { endpoint, json, parseBody, requireRole } from '~/lib/server/http.ts';

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json(await listAllGateways());
});

export const POST = endpoint(async ({ locals, request }) => {
  const user = requireRole(locals, ['admin']);
  const input = await parseBody(request, gatewayCreateSchema);
  return json({ gateway: await createGateway(user.id, input) }, 201);
});
