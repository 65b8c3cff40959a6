import { z } from 'zod';
import { CHARTING_ROLES, CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { obsInputSchema } from '~/lib/charting/obs-input.ts';
import { endpoint, json, parseBody, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';
import { chartObservation, listObservations } from '~/lib/server/charting/observations.ts';

const pageQuery = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(20),
  include: z.enum(['charted', 'all']).default('charted'),
});

export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  const q = parseQuery(url, pageQuery);
  return json(await listObservations(user, id, q.page, q.pageSize, q.include === 'all'));
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const now = new Date();
  const input = await parseBody(request, obsInputSchema(now));
  return json({ observation: await chartObservation(user, id, input, now) }, 201);
});
