import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { fhirWindowSchema } from '~/lib/fhir/window.ts';
import { fhirExportStream } from '~/lib/server/fhir/export.ts';
import { endpoint, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';

// A FHIR R4 Bundle (collection) of the patient's record in the window, streamed.
export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  const now = new Date();
  const { from, to } = parseQuery(url, fhirWindowSchema(now));
  const body = await fhirExportStream(user, id, from, to, url.origin, now);
  const stamp = (d: Date) => d.toISOString().slice(0, 16).replace(/[-:]/g, '');
  return new Response(body, {
    headers: {
      'content-type': 'application/fhir+json; charset=utf-8',
      'cache-control': 'no-store',
      'content-disposition': `attachment; filename="patient-${id}-${stamp(from)}-${stamp(to)}.fhir.json"`,
    },
  });
});
