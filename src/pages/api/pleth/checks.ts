import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { MAX_STRIP_BYTES } from '~/lib/pleth-strips/strip-csv.ts';
import { endpoint, json, parseBody, parseQuery, requireRole } from '~/lib/server/http.ts';
import { attachCheck, listChecks } from '~/lib/server/pleth-strips/checks.ts';

const listQuery = z.object({ patientId: z.coerce.number({ invalid_type_error: 'must be a number' }).int().positive() });

const attachSchema = z.object({
  patientId: z.number({ required_error: 'Choose the patient' }).int().positive(),
  observationId: z.number().int().positive().nullable().default(null),
  fileName: z.string({ required_error: 'Give the file name' }).trim().min(1).max(255),
  csv: z
    .string({ required_error: 'Send the strip' })
    .min(1, 'Send the strip')
    .max(MAX_STRIP_BYTES, 'The strip is larger than 2 MB'),
  sampleRateHz: z.number().positive().max(10_000).optional(),
  note: z.string().trim().max(500, '500 characters at most').optional(),
});

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { patientId } = parseQuery(url, listQuery);
  return json(await listChecks(user, patientId));
});

// Attaches a checked strip to the patient's record (re-analysed here: the page's figures are never trusted).
export const POST = endpoint(async ({ locals, request }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const input = await parseBody(request, attachSchema);
  return json({ check: await attachCheck(user, input) }, 201);
});
