import { CLINICAL_ROLES, ORDERING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { targetOrderSchema } from '~/lib/charting/target-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { listOrders, orderTarget } from '~/lib/server/charting/orders.ts';

export const GET = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  return json({ orders: await listOrders(user, id) });
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, ORDERING_ROLES);
  const { id } = parseParams(params, idParam);
  const input = await parseBody(request, targetOrderSchema);
  return json({ order: await orderTarget(user, id, input) }, 201);
});
