import { BED_MANAGING_ROLES } from '~/lib/auth/roles.ts';
import { z } from 'zod';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { assignNurse } from '~/lib/server/board/assignments.ts';

const body = z.object({
  nurseId: z.number({ invalid_type_error: 'Choose a nurse, or null to clear' }).int().positive().nullable(),
});

export const PUT = endpoint(async ({ locals, params, request }) => {
  const charge = requireRole(locals, BED_MANAGING_ROLES);
  const { id } = parseParams(params, idParam);
  const { nurseId } = await parseBody(request, body);
  return json(await assignNurse(charge, id, nurseId));
});
