import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { MAX_STRIP_BYTES } from '~/lib/pleth-strips/strip-csv.ts';
import { ApiError, endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { analyseStripText } from '~/lib/server/pleth-strips/checks.ts';
import { readUpload } from '~/lib/server/upload-body.ts';

const query = z.object({
  sampleRateHz: z.coerce
    .number({ invalid_type_error: 'Sample rate must be a number' })
    .positive('Sample rate must be above 0')
    .max(10_000)
    .optional(),
  fileName: z.string().trim().max(255).default('strip.csv'),
});

// Stores nothing: the strip goes through the computation module and comes back with its findings.
export const POST = endpoint(async ({ locals, request, url }) => {
  requireRole(locals, CLINICAL_ROLES);
  const q = parseQuery(url, query);
  if (!(request.headers.get('content-type') ?? '').startsWith('text/csv')) {
    throw new ApiError(415, 'unsupported_media_type', 'Send the strip as the body with content-type text/csv.');
  }
  const file = await readUpload(request, q.fileName, MAX_STRIP_BYTES);
  return json(analyseStripText(file.text, q.sampleRateHz));
});
