import { endpoint, json, parseBody, requireRole } from '~/lib/server/http.ts';
import { createUnitSchema } from '~/lib/staff/inputs.ts';
import { createUnit, listUnitsWithBeds } from '~/lib/server/units-admin.ts';

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json(await listUnitsWithBeds());
});

export const POST = endpoint(async ({ locals, request }) => {
  const admin = requireRole(locals, ['admin']);
  const input = await parseBody(request, createUnitSchema);
  return json(await createUnit(admin.id, input), 201);
});
