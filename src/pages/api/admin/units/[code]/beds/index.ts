import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { addBedSchema, reorderBedsSchema } from '~/lib/staff/inputs.ts';
import { addBed, reorderBeds } from '~/lib/server/units-admin.ts';

const paramsSchema = z.object({ code: z.string().min(1).max(16) });

export const POST = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code } = parseParams(params, paramsSchema);
  const { label } = await parseBody(request, addBedSchema);
  return json(await addBed(admin.id, code, label), 201);
});

/** The whole new order of the unit's active beds. */
export const PUT = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code } = parseParams(params, paramsSchema);
  const { bedIds } = await parseBody(request, reorderBedsSchema);
  return json(await reorderBeds(admin.id, code, bedIds));
});
