import { z } from 'zod';
import { admitSchema } from '~/lib/charting/patient-input.ts';
import { BED_MANAGING_ROLES, CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, parseBody, parseQuery, requireRole } from '~/lib/server/http.ts';
import { admitPatient, listPatients } from '~/lib/server/charting/patients.ts';

const listQuery = z.object({
  unit: z.string().max(16).optional(),
  discharged: z.enum(['include', 'exclude']).default('exclude'),
});

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const q = parseQuery(url, listQuery);
  return json({ patients: await listPatients(user, { unit: q.unit, includeDischarged: q.discharged === 'include' }) });
});

export const POST = endpoint(async ({ locals, request }) => {
  const user = requireRole(locals, BED_MANAGING_ROLES);
  const input = await parseBody(request, admitSchema);
  return json({ patient: await admitPatient(user, input) }, 201);
});
