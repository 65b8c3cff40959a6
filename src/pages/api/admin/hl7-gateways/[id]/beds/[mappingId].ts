import { z } from 'zod';
import { unmapGatewayBed } from '~/lib/server/hl7/gateways.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';

const params2 = z.object({
  id: z.coerce.number({ invalid_type_error: 'must be a number' }).int().positive(),
  mappingId: z.coerce.number({ invalid_type_error: 'must be a number' }).int().positive(),
});

// Removing a bed name from a gateway (configuration; audited). Readings already stored stay.
export const DELETE = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, ['admin']);
  const { id, mappingId } = parseParams(params, params2);
  return json({ gateway: await unmapGatewayBed(user.id, id, mappingId) });
});
