import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';
import { patientSeries, SERIES_WINDOWS } from '~/lib/server/charting/series.ts';

const seriesQuery = z.object({
  hours: z.coerce.number().refine((h) => (SERIES_WINDOWS as readonly number[]).includes(h), `hours must be one of ${SERIES_WINDOWS.join(', ')}`).default(12),
});

export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  const { hours } = parseQuery(url, seriesQuery);
  return json(await patientSeries(user, id, hours));
});
