import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';
import { patientSeries } from '~/lib/server/charting/series.ts';
import { CHART_WINDOW_HOURS, DEFAULT_WINDOW_HOURS } from '~/lib/charting/api-types.ts';

const seriesQuery = z.object({
  hours: z.coerce
    .number()
    .refine(
      (h) => (CHART_WINDOW_HOURS as readonly number[]).includes(h),
      `hours must be one of ${CHART_WINDOW_HOURS.join(', ')}`,
    )
    .default(DEFAULT_WINDOW_HOURS),
});

export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  const { hours } = parseQuery(url, seriesQuery);
  return json(await patientSeries(user, id, hours));
});
